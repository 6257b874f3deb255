/**
 * Diagnostics are values, not exceptions: every reader collects all the
 * problems it can find and returns them beside what it could read.
 */
export type Severity = 'error' | 'warning' | 'info';

export interface Diagnostic {
  /** Path relative to the workspace, as the user wrote it. */
  readonly file: string;
  /** 1-based line in `file`, where one applies. */
  readonly line?: number;
  /** 1-based column, where one applies. */
  readonly column?: number;
  readonly severity: Severity;
  /** Stable id such as `csv/not-a-number`; tests and tooling key on it. */
  readonly ruleId: string;
  /** One plain sentence a person can act on. */
  readonly message: string;
  /** The characteristic the problem belongs to, where there is one. */
  readonly characteristic?: string;
}

export interface Where {
  readonly file: string;
  readonly line?: number | undefined;
  readonly column?: number | undefined;
  readonly characteristic?: string | undefined;
}

export function diagnostic(severity: Severity, ruleId: string, where: Where, message: string): Diagnostic {
  const d: { -readonly [K in keyof Diagnostic]: Diagnostic[K] } = { file: where.file, severity, ruleId, message };
  if (where.line !== undefined) d.line = where.line;
  if (where.column !== undefined) d.column = where.column;
  if (where.characteristic !== undefined) d.characteristic = where.characteristic;
  return d;
}

export const error = (ruleId: string, where: Where, message: string) => diagnostic('error', ruleId, where, message);
export const warning = (ruleId: string, where: Where, message: string) => diagnostic('warning', ruleId, where, message);
export const info = (ruleId: string, where: Where, message: string) => diagnostic('info', ruleId, where, message);

export function hasErrors(list: readonly Diagnostic[]): boolean {
  return list.some((d) => d.severity === 'error');
}

/** `file:line:column: severity message [ruleId]`, the form editors and terminals link. */
export function formatDiagnostic(d: Diagnostic): string {
  const place = [d.file, d.line, d.line !== undefined ? d.column : undefined].filter((p) => p !== undefined).join(':');
  return `${place}: ${d.severity} ${d.message} [${d.ruleId}]`;
}

/** Diagnostics in a stable order: by file, line, column, then rule id. */
export function sortDiagnostics(list: readonly Diagnostic[]): Diagnostic[] {
  return [...list].sort(
    (a, b) =>
      a.file.localeCompare(b.file) ||
      (a.line ?? 0) - (b.line ?? 0) ||
      (a.column ?? 0) - (b.column ?? 0) ||
      a.ruleId.localeCompare(b.ruleId) ||
      a.message.localeCompare(b.message),
  );
}
