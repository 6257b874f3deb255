/**
 * The typed model every stage after reading works on. Nothing here knows
 * about files; `src/workspace/` builds these values from them.
 */

/** Chart families this version computes. */
export const CHART_IDS = ['individuals', 'xbar-r', 'xbar-s', 'p', 'np', 'c', 'u', 'laney-p', 'laney-u', 'g', 't'] as const;
export type ChartId = (typeof CHART_IDS)[number];

/** What review.yaml may ask for: a family, or `auto` for counts (c or u while counts are high enough, g when they are too low). */
export type ChartChoice = ChartId | 'auto';

export type Better = 'higher' | 'lower' | 'target';

export const LEDGER_ACTIONS = ['baseline', 'freeze', 'exclude', 'include', 'change', 'reviewed', 'note'] as const;
export type LedgerAction = (typeof LEDGER_ACTIONS)[number];
/** Actions whose reason is part of the record and may not be left empty. */
export const REASON_REQUIRED: ReadonlySet<LedgerAction> = new Set(['baseline', 'exclude', 'change', 'reviewed']);

/** An ISO calendar date `YYYY-MM-DD`; compared as a string, which orders it correctly. */
export type IsoDate = string;

export interface Spec {
  readonly lower?: number;
  readonly upper?: number;
  readonly target?: number;
}

/** Standard values given (ISO 7870-2): limits come from these instead of the data. */
export type Standard =
  | { readonly kind: 'variables'; readonly center: number; readonly sigma: number }
  | { readonly kind: 'attributes'; readonly center: number };

/** How a data CSV is written: its field delimiter and decimal mark (European files: `;` and `,`). */
export interface CsvFormat {
  readonly delimiter: ',' | ';' | '\t' | '|';
  readonly decimal: '.' | ',';
}

export const DEFAULT_CSV: CsvFormat = { delimiter: ',', decimal: '.' };

export interface Characteristic {
  readonly id: string;
  readonly name: string;
  readonly chart: ChartId;
  /** Path relative to the workspace, as written in review.yaml. */
  readonly data: string;
  readonly unit: string;
  readonly better: Better;
  readonly spec?: Spec;
  readonly standard?: Standard;
  readonly safety: boolean;
  readonly tags: readonly string[];
  /**
   * Rate charts (u, laney-u): the plotted rate is per this many units of
   * exposure, e.g. 200000 hours worked for the incidence-rate convention of
   * occupational safety statistics. Absent: per one unit.
   */
  readonly per?: number;
  /** Set when review.yaml said `chart: auto`: why this family was chosen. */
  readonly chosen?: string;
  /** The data file's delimiter and decimal mark, where not the default `,` and `.`. */
  readonly csv?: CsvFormat;
}

/** A characteristic as review.yaml gives it, before `chart: auto` is resolved against its data. */
export interface ConfiguredCharacteristic extends Omit<Characteristic, 'chart' | 'chosen'> {
  readonly chart: ChartChoice;
}

export type RuleSetName = 'western-electric' | 'nelson';

export interface ReviewConfig {
  readonly title: string;
  readonly organisation: string;
  readonly period: { readonly from: IsoDate; readonly to: IsoDate };
  /** A named set, or an explicit list of rule ids. */
  readonly rules: RuleSetName | readonly string[];
  readonly minPoints: number;
  readonly freezeAfter: number;
  /** Names to print on a customer's pack, by tag (`build --only tag=NAME`). */
  readonly customers: Readonly<Record<string, string>>;
  readonly characteristics: readonly ConfiguredCharacteristic[];
}

/** One plotted point's raw observations, by the shape of data its chart reads. */
export type Observation =
  | { readonly kind: 'measurements'; readonly values: readonly number[] }
  | { readonly kind: 'proportion'; readonly defectives: number; readonly inspected: number }
  | { readonly kind: 'count'; readonly count: number }
  | { readonly kind: 'rate'; readonly count: number; readonly exposure: number }
  /** g chart: opportunities (units, days, hours) between the previous event and this one. */
  | { readonly kind: 'gap'; readonly between: number }
  /** t chart: days from the previous event to this one. */
  | { readonly kind: 'interval'; readonly days: number };

export interface Sample {
  /** The point's name: the `label` column, or the date where there is none. */
  readonly label: string;
  readonly date: IsoDate;
  /** First line of the data file that contributed to this point. */
  readonly line: number;
  readonly observation: Observation;
}

export interface LedgerEntry {
  readonly line: number;
  readonly date: IsoDate;
  readonly characteristic: string;
  readonly action: LedgerAction;
  /** Point label; empty only for `note`. */
  readonly point: string;
  readonly reason: string;
  readonly by: string;
}
