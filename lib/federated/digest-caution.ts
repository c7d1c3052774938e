/**
 * The caution a report built from digests carries (methods.md §9, product.md's cautions): one
 * sentence, written into the report's warnings by the coordinator and shown where it is read.
 */
export const DIGEST_CAUTION =
  "Built from client digests: no row left its client, but digests are aggregates (counts and sums per shard), not a differential-privacy guarantee; per-shard gradients and label counts can still reveal information about a client's data.";
