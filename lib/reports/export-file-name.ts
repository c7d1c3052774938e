/**
 * A download name for a report export: the title reduced to lowercase ASCII words joined by
 * hyphens, the version, and the export's suffix — e.g. "Penguins by island", v2, "summary.json" →
 * "penguins-by-island-v2.summary.json". ASCII only, so the plain `filename=` header parameter needs
 * no quoting rules beyond the quotes themselves.
 */
export function nameExportFile(title: string, version: number, suffix: string): string {
  const slug = title
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, 60)
    .replace(/-+$/, "");
  return `${slug || "report"}-v${version}.${suffix}`;
}

/** Headers that make the browser save the body as `fileName` and keep no shared copy of it. */
export function describeDownload(fileName: string, contentType: string): HeadersInit {
  return {
    "Content-Type": contentType,
    "Content-Disposition": `attachment; filename="${fileName}"`,
    "Cache-Control": "private, no-store",
    "X-Content-Type-Options": "nosniff",
  };
}
