/**
 * Runtime shim for chevrotain 13 on Node 20.
 *
 * chevrotain 13 calls `Object.groupBy` (ES2024, Node >= 21) while validating
 * the grammar; Node 20 and the Node 20 inside current editor hosts lack it.
 * We install the standard behaviour (ECMA-262 2024, §20.1.2.11
 * Object.groupBy) only when it is missing, so newer runtimes keep their own.
 * Imported for its side effect by grammar.ts before the parser is built.
 */
type GroupBy = <T, K extends PropertyKey>(items: Iterable<T>, key: (item: T, index: number) => K) => Partial<Record<K, T[]>>;

const objectCtor = Object as unknown as { groupBy?: GroupBy };
if (typeof objectCtor.groupBy !== 'function') {
  const groupBy: GroupBy = <T, K extends PropertyKey>(items: Iterable<T>, key: (item: T, index: number) => K) => {
    const out = Object.create(null) as Partial<Record<K, T[]>>;
    let i = 0;
    for (const item of items) {
      const k = key(item, i++);
      const bucket = out[k];
      if (bucket) bucket.push(item);
      else out[k] = [item];
    }
    return out;
  };
  Object.defineProperty(Object, 'groupBy', { value: groupBy, writable: true, configurable: true, enumerable: false });
}

export {};
