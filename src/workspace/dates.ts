/** ISO calendar dates, `YYYY-MM-DD`, checked to be real days. */
const ISO = /^(\d{4})-(\d{2})-(\d{2})$/;

export function isIsoDate(text: string): boolean {
  const m = ISO.exec(text);
  if (!m) return false;
  // Arithmetic, not a Date: this runs once per data row.
  const y = Number(m[1]);
  const mo = Number(m[2]);
  const d = Number(m[3]);
  if (mo < 1 || mo > 12 || d < 1) return false;
  const leap = (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0;
  return d <= (mo === 2 ? (leap ? 29 : 28) : mo === 4 || mo === 6 || mo === 9 || mo === 11 ? 30 : 31);
}

/** Why a date cell is not an ISO date, in words; null when it is one. */
export function dateProblem(text: string): string | null {
  if (isIsoDate(text)) return null;
  if (text === '') return 'is empty';
  if (ISO.test(text)) return `"${text}" is not a real calendar day`;
  if (/^\d{4}-\d{2}-\d{2}[T ]/.test(text)) return `"${text}" carries a time; write the date alone as YYYY-MM-DD`;
  return `"${text}" is not a date in the form YYYY-MM-DD`;
}
