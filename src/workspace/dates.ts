/** ISO calendar dates, `YYYY-MM-DD`, checked to be real days. */
const ISO = /^(\d{4})-(\d{2})-(\d{2})$/;

export function isIsoDate(text: string): boolean {
  const m = ISO.exec(text);
  if (!m) return false;
  const [y, mo, d] = [Number(m[1]), Number(m[2]), Number(m[3])];
  const t = new Date(Date.UTC(y, mo - 1, d));
  return t.getUTCFullYear() === y && t.getUTCMonth() === mo - 1 && t.getUTCDate() === d;
}

/** Why a date cell is not an ISO date, in words; null when it is one. */
export function dateProblem(text: string): string | null {
  if (isIsoDate(text)) return null;
  if (text === '') return 'is empty';
  if (ISO.test(text)) return `"${text}" is not a real calendar day`;
  if (/^\d{4}-\d{2}-\d{2}[T ]/.test(text)) return `"${text}" carries a time; write the date alone as YYYY-MM-DD`;
  return `"${text}" is not a date in the form YYYY-MM-DD`;
}
