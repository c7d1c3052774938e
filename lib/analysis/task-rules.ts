// The rule that tells a class label from a regression target (methods.md §1), on its own so the
// upload preview in the browser can apply it without the engine's Node-only encoding code.

/** A numeric label with at most this many distinct values is a class label (methods.md §1). */
export const MAX_CLASSES_FOR_NUMERIC_LABEL = 20;
