/**
 * A read-only map from ids to the items of a list (each item under its id, the last one winning
 * as with Map#set), kept in several small Maps chosen by the id's last characters. One Map of
 * 20,000 stages was the slowest step of building a board index: past about 4,096 entries each
 * doubling of a Map's table is allocated in large-object space, which costs far more than the
 * inserts. A read is one plain Map look-up in the chosen part; iteration (rare) goes through an
 * ordinary Map built from the list on first use, so it gives exactly what a Map would.
 *
 * @example
 * const byId = new IdMap(stageList, (info) => info.stage.id)
 * byId.get('lift-1')?.idx
 */
export class IdMap<V> implements ReadonlyMap<string, V> {
  private readonly parts: Map<string, V>[] = [];
  private readonly list: readonly V[];
  private readonly idOf: (item: V) => string;
  private whole: Map<string, V> | undefined;

  constructor(list: readonly V[], idOf: (item: V) => string) {
    this.list = list;
    this.idOf = idOf;
    for (let i = 0; i < PARTS; i++) this.parts.push(new Map());
    for (let i = 0; i < list.length; i++) {
      const item = list[i] as V;
      const id = idOf(item);
      this.partOf(id).set(id, item);
    }
  }

  get(id: string): V | undefined {
    return this.partOf(id).get(id);
  }

  has(id: string): boolean {
    return this.partOf(id).has(id);
  }

  get size(): number {
    let n = 0;
    for (const part of this.parts) n += part.size;
    return n;
  }

  forEach(fn: (value: V, key: string, map: ReadonlyMap<string, V>) => void, thisArg?: unknown): void {
    this.asMap().forEach((v, k) => fn.call(thisArg, v, k, this));
  }

  keys(): MapIterator<string> {
    return this.asMap().keys();
  }

  values(): MapIterator<V> {
    return this.asMap().values();
  }

  entries(): MapIterator<[string, V]> {
    return this.asMap().entries();
  }

  [Symbol.iterator](): MapIterator<[string, V]> {
    return this.asMap().entries();
  }

  get [Symbol.toStringTag](): string {
    return 'IdMap';
  }

  private partOf(id: string): Map<string, V> {
    // Ids are mostly numbers, UUIDs or "job-12-s3": their last four characters spread them well
    // enough. Any string works; only the spread would suffer.
    if (typeof id !== 'string') return this.parts[0] as Map<string, V>;
    let h = id.length;
    for (let i = Math.max(0, id.length - 4); i < id.length; i++) h = h * 31 + id.charCodeAt(i);
    h ^= h >> 5;
    return this.parts[h & (PARTS - 1)] as Map<string, V>;
  }

  private asMap(): Map<string, V> {
    if (this.whole === undefined) {
      const m = new Map<string, V>();
      for (const item of this.list) m.set(this.idOf(item), item);
      this.whole = m;
    }
    return this.whole;
  }
}

/** How many parts (a power of two). */
const PARTS = 32;
