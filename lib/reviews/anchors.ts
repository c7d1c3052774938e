/** Parts of the report page a comment thread can be pinned to, keyed as stored in review_comments. */
export const REPORT_SECTIONS = {
  verdict: "Verdict",
  "key-figures": "Key figures",
  provenance: "Inputs and parameters",
  evidence: "Evidence",
  shards: "Per-shard table",
  methods: "Methods",
} as const;

export type ReportSection = keyof typeof REPORT_SECTIONS;

export function isReportSection(key: string): key is ReportSection {
  return Object.hasOwn(REPORT_SECTIONS, key);
}

/** How a thread's pin reads to people: "Evidence", "Shard Dream", or nothing when not pinned. */
export function describeAnchor(kind: "section" | "shard" | null, anchor: string | null): string {
  if (!kind || !anchor) return "";
  if (kind === "shard") return `Shard ${anchor}`;
  return isReportSection(anchor) ? REPORT_SECTIONS[anchor] : anchor;
}
