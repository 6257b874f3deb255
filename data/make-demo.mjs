// Writes the demo workspace data/demo/ from fixed seeds: `npm run demo:data`.
//
// Everything it writes is invented. Brightwater Bottling, its lines, its
// closure supplier Keystone Closures, the people named in the ledger and
// every figure are fictional; any resemblance to a real plant is chance.
//
// Each characteristic is shaped to show one recommendation of the month's
// review (see the comment above each); the noise is seeded, so the files are
// the same on every run and the demo pack is reproducible.
import { mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), 'demo');

/** mulberry32: a small, well-mixed 32-bit generator. */
function rng(seed) {
  let a = seed >>> 0;
  const next = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const normal = () => {
    // Box–Muller; 1 - u keeps the logarithm finite.
    const u = 1 - next();
    const v = next();
    return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v);
  };
  const poisson = (mean) => {
    // Knuth's product method; fine for the small means used here.
    const limit = Math.exp(-mean);
    let k = 0;
    for (let p = next(); p > limit; p *= next()) k++;
    return k;
  };
  const binomial = (n, p) => {
    let k = 0;
    for (let i = 0; i < n; i++) if (next() < p) k++;
    return k;
  };
  return { next, normal, poisson, binomial };
}

const DAY = 86_400_000;
const iso = (ms) => new Date(ms).toISOString().slice(0, 10);
const at = (y, m, d) => Date.UTC(y, m - 1, d);
/** Every Monday from `from` through `to`. */
const mondays = (from, to) => {
  const out = [];
  for (let t = from; t <= to; t += 7 * DAY) out.push(iso(t));
  return out;
};
/** Every working day (Monday to Friday) from `from` through `to`. */
const workdays = (from, to) => {
  const out = [];
  for (let t = from; t <= to; t += DAY) {
    const wd = new Date(t).getUTCDay();
    if (wd !== 0 && wd !== 6) out.push(iso(t));
  }
  return out;
};
const round = (x, d) => Number(x.toFixed(d));
const csv = (v) => (/[",\n]/.test(String(v)) ? `"${String(v).replace(/"/g, '""')}"` : String(v));

function write(name, header, rows) {
  writeFileSync(join(root, name), `${[header, ...rows.map((r) => r.map(csv).join(','))].join('\n')}\n`);
}

rmSync(join(root, 'data'), { recursive: true, force: true });
mkdirSync(join(root, 'data'), { recursive: true });
const ledger = [];
const record = (date, characteristic, action, point, reason, by) => ledger.push([date, characteristic, action, point, reason, by]);

const END = at(2026, 11, 30);

// Fill volume, line 1 (individuals): a new filler valve started in October;
// its trial limits now rest on enough stable points — ready to freeze.
{
  const r = rng(11);
  const days = workdays(at(2026, 10, 5), END);
  write('data/fill-volume.csv', 'date,value', days.map((d) => [d, round(500.4 + 0.9 * r.normal(), 1)]));
}

// Cap removal torque (xbar-r, subgroups of 5, daily): frozen in August and
// stable since — keep.
{
  const r = rng(29);
  const days = workdays(at(2026, 7, 6), END).filter((_, i) => i % 2 === 0);
  const rows = [];
  for (const d of days) for (let j = 0; j < 5; j++) rows.push([d, round(2.1 + 0.12 * r.normal(), 2)]);
  write('data/cap-torque.csv', 'date,value', rows);
  record('2026-08-14', 'cap-torque', 'freeze', days[20], 'Trial limits stable over 21 subgroups', 'R. Okafor');
}

// Closure wall thickness (xbar-s, subgroups of 8, weekly, for the customer):
// one subgroup measured with a damaged gauge was excluded with its cause;
// stable otherwise — keep.
{
  const r = rng(37);
  const weeks = mondays(at(2026, 3, 2), END);
  const rows = [];
  weeks.forEach((d, k) => {
    const bad = k === 9;
    for (let j = 0; j < 8; j++) rows.push([d, round(1.2 + (bad ? 0.09 : 0) + 0.025 * r.normal(), 3)]);
  });
  write('data/closure-wall.csv', 'date,value', rows);
  record('2026-05-06', 'closure-wall', 'exclude', weeks[9], 'Gauge anvil found chipped at calibration; subgroup re-measured invalid', 'L. Brandt');
  record('2026-08-05', 'closure-wall', 'freeze', weeks[21], 'Trial limits stable over 21 usable subgroups', 'L. Brandt');
}

// Label defects (p, daily lots of varying size): one lot in November far
// above the limit, nothing recorded about it yet — a fleeting special cause
// to investigate.
{
  const r = rng(41);
  const days = workdays(at(2026, 8, 3), END);
  const spike = days.indexOf('2026-11-18');
  const rows = days.map((d, i) => {
    const n = 600 + Math.floor(r.next() * 900);
    return [d, r.binomial(n, i === spike ? 0.034 : 0.012), n];
  });
  write('data/label-defects.csv', 'date,defectives,inspected', rows);
  record('2026-09-01', 'label-defects', 'freeze', days[21], 'Trial limits stable over 22 lots', 'R. Okafor');
}

// Line stoppages (c, weekly): preventive maintenance changed in September;
// stoppages have stayed lower since — re-baseline at the recorded change.
{
  const r = rng(53);
  const weeks = mondays(at(2026, 1, 5), END);
  const change = weeks.indexOf('2026-09-14');
  write('data/line-stoppages.csv', 'date,count', weeks.map((d, i) => [d, r.poisson(i < change ? 9 : 4.5)]));
  record('2026-06-01', 'line-stoppages', 'freeze', weeks[20], 'Trial limits stable over 21 weeks', 'R. Okafor');
  record('2026-09-15', 'line-stoppages', 'change', weeks[change], 'New preventive maintenance schedule for the labeller and capper', 'M. Silva');
}

// First-aid cases per 1,000 hours worked (u, weekly, safety-related): new
// machine guarding in October; the rate since is clearly lower by an exact
// test, though counts are too small for a run rule to have fired yet —
// re-baseline at the recorded change, with the cautions section.
{
  const r = rng(67);
  const weeks = mondays(at(2026, 1, 5), END);
  const guarding = weeks.indexOf('2026-10-26');
  write(
    'data/first-aid.csv',
    'date,count,exposure',
    weeks.map((d, i) => {
      const hours = round(3.6 + 0.5 * r.next(), 2); // thousands of hours worked
      return [d, r.poisson((i < guarding ? 0.9 : 0.2) * hours), hours];
    }),
  );
  record('2026-05-26', 'first-aid', 'freeze', weeks[20], 'Trial limits stable over 21 weeks', 'J. Haddad');
  record('2026-10-27', 'first-aid', 'change', weeks[guarding], 'Fixed guards fitted on the capper and labeller infeed', 'M. Silva');
}

// Defective caps in the supplier's outgoing sample of 200 (np, daily): the
// level rose in October and nothing in the ledger explains it — investigate.
{
  const r = rng(79);
  const days = workdays(at(2026, 7, 1), END).filter((_, i) => i % 2 === 0);
  const shift = days.findIndex((d) => d >= '2026-10-14');
  write('data/cap-defects.csv', 'date,defectives,inspected', days.map((d, i) => [d, r.binomial(200, i < shift ? 0.02 : 0.034), 200]));
  record('2026-08-12', 'cap-defects', 'freeze', days[20], 'Trial limits stable over 21 samples', 'L. Brandt');
}

// Carbonation (individuals, volumes of CO2): frozen; one high reading was
// investigated and explained — keep.
{
  const r = rng(83);
  const days = workdays(at(2026, 9, 1), END).filter((_, i) => i % 2 === 0);
  const odd = days.indexOf('2026-11-10');
  write('data/carbonation.csv', 'date,value', days.map((d, i) => [d, round(2.7 + (i === odd ? 0.32 : 0) + 0.05 * r.normal(), 2)]));
  record('2026-10-01', 'carbonation', 'freeze', days[20], 'Trial limits stable over 21 readings', 'R. Okafor');
  record('2026-11-11', 'carbonation', 'reviewed', days[odd], 'CO2 supply pressure spike during a tank change; regulator reset, no product affected', 'M. Silva');
}

// Neck finish diameter on the new mould (individuals): three points so far —
// keep collecting.
{
  const r = rng(97);
  const days = ['2026-11-23', '2026-11-25', '2026-11-27'];
  write('data/neck-finish.csv', 'date,value', days.map((d) => [d, round(27.4 + 0.04 * r.normal(), 3)]));
}

// Bottle weight against the purchase standard (individuals, standard values
// given): stable about the standard — keep.
{
  const r = rng(101);
  const weeks = mondays(at(2026, 4, 6), END);
  write('data/bottle-weight.csv', 'date,value', weeks.map((d) => [d, round(24 + 0.18 * r.normal(), 2)]));
}

// Seal leaks per 1,000 closures tested (u, daily, the supplier's test rig):
// frozen and stable — keep.
{
  const r = rng(109);
  const days = workdays(at(2026, 8, 3), END).filter((_, i) => i % 3 === 0);
  write(
    'data/seal-leaks.csv',
    'date,count,exposure',
    days.map((d) => {
      const tested = round(1 + Math.floor(r.next() * 4) * 0.5, 1); // thousands of closures
      return [d, r.poisson(2.2 * tested), tested];
    }),
  );
  record('2026-09-30', 'seal-leaks', 'freeze', days[20], 'Trial limits stable over 21 test runs', 'L. Brandt');
}

// Near misses reported (c, weekly, safety-related incident count): frozen
// and stable — keep, with the cautions section.
{
  const r = rng(113);
  const weeks = mondays(at(2026, 1, 5), END);
  write('data/near-misses.csv', 'date,count', weeks.map((d) => [d, r.poisson(3.2)]));
  record('2026-05-26', 'near-misses', 'freeze', weeks[20], 'Trial limits stable over 21 weeks', 'J. Haddad');
}

// Recordable injuries (safety-related): one seeded day-by-day history feeds
// two charts. About one injury every 15 working days until walkways were
// segregated from forklift routes in June 2026; one injury since, in late
// November.
//  - as a monthly incidence rate per 200,000 hours worked (u): a month holds
//    about 1.4 injuries, so the lower limit is 0 and no single month can show
//    the improvement; an exact test of the rates before and after the
//    recorded change does — re-baseline;
//  - as working days between injuries (g): the long gap ending in November
//    lies above the upper probability limit, an improvement a c or u chart
//    cannot signal — investigate what went right.
{
  const r = rng(132);
  const days = workdays(at(2024, 1, 1), END);
  const segregation = '2026-06-01';
  const injured = days.filter((d) => (d < segregation ? r.next() < 1 / 15 : d === '2026-11-24'));
  const months = [];
  for (let y = 2024; y <= 2026; y++) for (let m = 1; m <= 12; m++) if (y < 2026 || m <= 11) months.push(`${y}-${String(m).padStart(2, '0')}-01`);
  const monthOf = (d) => `${d.slice(0, 7)}-01`;
  write(
    'data/recordable-injuries.csv',
    'date,count,exposure',
    months.map((m) => {
      const working = days.filter((d) => monthOf(d) === m).length;
      const hours = Math.round(working * 8 * (226 + 12 * r.next()));
      return [m, injured.filter((d) => monthOf(d) === m).length, hours];
    }),
  );
  record('2025-09-03', 'recordable-injuries', 'freeze', months[19], 'Trial limits stable over 20 months', 'J. Haddad');
  record('2026-06-02', 'recordable-injuries', 'change', segregation, 'Pedestrian walkways segregated from forklift routes', 'M. Silva');
  // The worst month was looked into at the time.
  const worst = months.slice(0, 30).reduce((w, m) => (injured.filter((d) => monthOf(d) === m).length > injured.filter((d) => monthOf(d) === w).length ? m : w));
  record('2026-06-02', 'recordable-injuries', 'reviewed', worst, 'Cuts during the line 2 changeover; blade guards replaced on the case cutters', 'J. Haddad');
  const dayIndex = new Map(days.map((d, i) => [d, i]));
  const gaps = injured.slice(1).map((d, i) => [d, dayIndex.get(d) - dayIndex.get(injured[i]) - 1]);
  write('data/injury-gaps.csv', 'date,between', gaps);
  record('2025-06-04', 'injury-gaps', 'freeze', gaps[19][0], 'Trial limits stable over 20 gaps', 'J. Haddad');
}

// Forklift near-contact events (t, one row per event, days between them):
// about one a week since the new reporting app; frozen and stable — keep.
{
  const r = rng(137);
  const events = [];
  for (let t = at(2025, 9, 1); t <= END; t += Math.round(-6.5 * Math.log(1 - r.next())) * DAY) events.push(iso(t));
  write('data/forklift-contacts.csv', 'date', events.map((d) => [d]));
  record('2026-01-14', 'forklift-contacts', 'freeze', events[20], 'Trial limits stable over 20 intervals', 'J. Haddad');
}

// Vision-system rejects on line 1 (laney-p, daily, about 100,000 bottles a
// day): with subgroups this large the day-to-day variation is far wider than
// the binomial allows, so an ordinary p chart would flag most days. The same
// data as a p chart shows the overdispersion check recommending laney-p.
{
  const r = rng(139);
  const days = workdays(at(2026, 8, 3), END);
  const rows = days.map((d) => {
    const n = 90000 + Math.floor(r.next() * 30000);
    const p = 0.0042 * Math.exp(0.18 * r.normal());
    return [d, Math.max(0, Math.round(n * p + Math.sqrt(n * p * (1 - p)) * r.normal())), n];
  });
  write('data/vision-rejects.csv', 'date,defectives,inspected', rows);
  record('2026-10-01', 'vision-rejects', 'freeze', days[43], 'Trial limits stable over 44 days (laney-p)', 'R. Okafor');
}

// Conveyor jams per 100,000 bottles (laney-u, daily): overdispersed counts on
// a large exposure; trial limits on enough stable days — freeze.
{
  const r = rng(149);
  const days = workdays(at(2026, 10, 19), END);
  write(
    'data/conveyor-jams.csv',
    'date,count,exposure',
    days.map((d) => {
      const bottles = 380000 + Math.floor(r.next() * 60000);
      const mean = (bottles / 100000) * 11 * Math.exp(0.2 * r.normal());
      return [d, Math.max(0, Math.round(mean + Math.sqrt(mean) * r.normal())), bottles];
    }),
  );
}

// Minor chemical spills (monthly counts, chart: auto): about one every two
// months, too few for a c chart to show an improvement, so auto draws a g
// chart of the months between spills.
{
  const r = rng(151);
  const months = [];
  for (let y = 2024; y <= 2026; y++) for (let m = 1; m <= 12; m++) if (y < 2026 || m <= 11) months.push(`${y}-${String(m).padStart(2, '0')}-01`);
  write('data/spills.csv', 'date,count', months.map((m) => [m, r.poisson(0.5)]));
}

ledger.sort((a, b) => (a[0] < b[0] ? -1 : a[0] > b[0] ? 1 : 0));
write('ledger.csv', 'date,characteristic,action,point,reason,by', ledger);
console.log(`wrote ${root}`);
