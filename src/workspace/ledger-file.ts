/**
 * ledger.csv: the append-only record of limit decisions. Row problems are
 * reported on their line and belong to the characteristic the row names, so
 * one bad row stops only that characteristic.
 */
import { type Diagnostic, error } from '../diagnostics.ts';
import { LEDGER_ACTIONS, type LedgerAction, type LedgerEntry, REASON_REQUIRED } from '../model.ts';
import { LEDGER_COLUMNS, unguard } from '../review/ledger-line.ts';
import { columnOf, readCsvTable } from './csv-table.ts';
import { dateProblem } from './dates.ts';

export const LEDGER_FILE = 'ledger.csv';

export function readLedger(
  text: string,
  knownIds: ReadonlySet<string>,
  file = LEDGER_FILE,
): { entries: LedgerEntry[]; diagnostics: Diagnostic[]; fileBroken: boolean } {
  const read = readCsvTable(text, file);
  const diagnostics = [...read.diagnostics];
  if (!read.table) return { entries: [], diagnostics, fileBroken: true };
  const t = read.table;
  const col = new Map(t.header.map((h, i) => [h, i]));
  let fileBroken = false;
  for (const name of LEDGER_COLUMNS) {
    if (!col.has(name)) {
      diagnostics.push(error('ledger/missing-column', { file, line: t.headerLine }, `Column "${name}" is missing; the ledger's columns are ${LEDGER_COLUMNS.join(', ')}.`));
      fileBroken = true;
    }
  }
  t.header.forEach((h, i) => {
    if (!(LEDGER_COLUMNS as readonly string[]).includes(h)) {
      diagnostics.push(error('ledger/unknown-column', { file, line: t.headerLine, column: columnOf(t.header, i) }, `Column "${h}" is not a ledger column; expected ${LEDGER_COLUMNS.join(', ')}.`));
      fileBroken = true;
    }
  });
  if (fileBroken) return { entries: [], diagnostics, fileBroken };

  const entries: LedgerEntry[] = [];
  let lastDate = '';
  let lastLine = 0;
  for (const r of t.rows) {
    // Fields guarded against spreadsheet formulas when written ('=…) read back as written from.
    const get = (name: string) => unguard(r.cells[col.get(name)!]!);
    const characteristic = get('characteristic');
    const where = (name: string) => ({
      file,
      line: r.line,
      column: columnOf(r.cells, col.get(name)!),
      ...(knownIds.has(characteristic) ? { characteristic } : {}),
    });
    let ok = true;
    const date = get('date');
    const dp = dateProblem(date);
    if (dp) {
      diagnostics.push(error('ledger/bad-date', where('date'), `Column "date" ${dp}.`));
      ok = false;
    } else if (date < lastDate) {
      diagnostics.push(error('ledger/date-order', where('date'), `Date ${date} is earlier than ${lastDate} on line ${lastLine}; the ledger is kept in the order decisions were taken.`));
      ok = false;
    } else {
      lastDate = date;
      lastLine = r.line;
    }
    if (!knownIds.has(characteristic)) {
      diagnostics.push(
        error('ledger/unknown-characteristic', where('characteristic'), characteristic === '' ? 'Column "characteristic" is empty.' : `No characteristic "${characteristic}" in review.yaml.`),
      );
      ok = false;
    }
    const action = get('action');
    if (!(LEDGER_ACTIONS as readonly string[]).includes(action)) {
      diagnostics.push(error('ledger/unknown-action', where('action'), `"${action}" is not a ledger action; use one of ${LEDGER_ACTIONS.join(', ')}.`));
      ok = false;
    }
    const point = get('point');
    if (point === '' && action !== 'note') {
      diagnostics.push(error('ledger/missing-point', where('point'), `A ${action || 'ledger'} entry must name the point it applies to.`));
      ok = false;
    }
    const reason = get('reason');
    if (reason === '' && REASON_REQUIRED.has(action as LedgerAction)) {
      diagnostics.push(error('ledger/missing-reason', where('reason'), `A ${action} entry needs a reason (the assignable cause, the change, or what was found).`));
      ok = false;
    }
    if (ok) entries.push({ line: r.line, date, characteristic, action: action as LedgerAction, point, reason, by: get('by') });
  }
  return { entries, diagnostics, fileBroken };
}
