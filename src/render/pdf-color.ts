/** A colour as the PDF's operators take it: red, green and blue from 0 to 1. */
export interface RGB {
  readonly red: number;
  readonly green: number;
  readonly blue: number;
}

export const rgb = (red: number, green: number, blue: number): RGB => ({ red, green, blue });
