/**
 * Counts the notifications a listener receives, with a wait for a count: tests of the database's
 * notifications wait for the notices themselves, so a missing one fails by the test's timeout.
 * `listen` subscribes the given callback and resolves to the function that unsubscribes it.
 */
export async function countNotices(listen: (onNotice: () => void) => Promise<() => void>) {
  let count = 0;
  let check = () => {};
  const stop = await listen(() => {
    count++;
    check();
  });
  return {
    stop,
    get count() {
      return count;
    },
    /** Resolves once `total` notices have arrived in all. */
    until: (total: number) =>
      new Promise<void>((resolve) => {
        check = () => {
          if (count >= total) resolve();
        };
        check();
      }),
  };
}
