/**
 * A list whose items are made when read, one at a time. summary.json lists
 * every point of every chart; built as objects up front, a million-point
 * series held a million of them (hundreds of megabytes) only to write them
 * out. jsonBytes writes a LazyList item by item, so each point object lives
 * just long enough to be written; anything else that serialises it gets the
 * whole array through toJSON, so the JSON is the same either way.
 */
export class LazyList<T> {
  constructor(
    readonly length: number,
    private readonly item: (index: number) => T,
  ) {}

  /** The item at `index` (negative counts from the end, as Array.prototype.at does); undefined outside the list. */
  at(index: number): T | undefined {
    const i = index < 0 ? this.length + index : index;
    return i >= 0 && i < this.length ? this.item(i) : undefined;
  }

  toJSON(): T[] {
    return Array.from({ length: this.length }, (_, i) => this.item(i));
  }
}

/** A value as JSON.parse gives it back: every LazyList (and readonly array) an array. */
export type Serialized<T> =
  T extends LazyList<infer U> ? Serialized<U>[] : T extends readonly (infer U)[] ? Serialized<U>[] : T extends object ? { -readonly [K in keyof T]: Serialized<T[K]> } : T;
