/** Points along the path W_t = t·W* where ζ² is measured (methods.md §3). */
export const PATH_POINTS = [0, 0.25, 0.5, 0.75, 1];
