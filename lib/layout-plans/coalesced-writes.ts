/** A write to the database, started when its turn comes. */
export type Write = () => Promise<unknown>;

export interface CoalescedWrites {
  /**
   * Queues `write` under `key`. Progress (`always` false) is written at most once per interval per
   * key: a value that comes sooner waits for the interval's end, replaced by any newer value of its
   * key meanwhile, so the latest value is always written. An end (`always` true) is written at
   * once and replaces the key's waiting value.
   */
  enqueue(key: string, write: Write, always?: boolean): void;
  /** Writes every waiting value now and resolves once every write has finished. */
  flush(): Promise<void>;
}

/**
 * Writes of one background run, one at a time and in the order they start, each key's progress
 * coalesced to one write per `intervalMs` without losing the last value (a run reports far more
 * often than a page polls). A failed write is handed to `onError` and the writes go on.
 */
export function createCoalescedWrites(
  intervalMs: number,
  onError: (error: unknown) => void,
): CoalescedWrites {
  let chain: Promise<void> = Promise.resolve();
  const keys = new Map<string, { cooling: ReturnType<typeof setTimeout>; waiting?: Write }>();

  const start = (key: string, write: Write) => {
    chain = chain.then(write).then(() => {}, onError);
    keys.set(key, { cooling: setTimeout(() => coolDown(key), intervalMs) });
  };
  const coolDown = (key: string) => {
    const waiting = keys.get(key)?.waiting;
    keys.delete(key);
    if (waiting) start(key, waiting);
  };

  return {
    enqueue(key, write, always = false) {
      const state = keys.get(key);
      if (state === undefined || always) {
        if (state) clearTimeout(state.cooling);
        start(key, write);
      } else {
        state.waiting = write;
      }
    },
    flush() {
      for (const [key, { cooling, waiting }] of keys) {
        clearTimeout(cooling);
        keys.delete(key);
        if (waiting) chain = chain.then(waiting).then(() => {}, onError);
      }
      return chain;
    },
  };
}
