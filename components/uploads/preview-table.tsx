import type { DataFilePreview } from "@/db/schema/analyses";

const TYPE_STYLES: Record<DataFilePreview["columns"][number]["type"], string> = {
  numeric: "bg-indigo-soft text-indigo",
  categorical: "bg-verdigris-soft text-verdigris",
  empty: "bg-paper-deep text-ink-faint",
};

/**
 * The first rows of an uploaded file under its detected column types, so the user can check the
 * file is the one they meant before mapping its columns.
 */
export function PreviewTable({ name, preview }: { name: string; preview: DataFilePreview }) {
  const sampled = preview.truncated ? "in the first 256 KB" : "in the whole file";
  return (
    <figure className="space-y-2">
      <div className="max-h-80 overflow-auto rounded-lg border border-ink/10 bg-white">
        <table className="w-full text-left text-xs">
          <thead className="sticky top-0 bg-paper-deep">
            <tr>
              {preview.columns.map((column, index) => (
                <th key={index} scope="col" className="px-3 py-2 align-bottom font-medium">
                  <span className="block whitespace-nowrap text-ink">{column.name}</span>
                  <span
                    className={`mt-1 inline-block rounded px-1.5 py-0.5 text-[11px] font-normal ${TYPE_STYLES[column.type]}`}
                  >
                    {column.type} · {column.distinct} distinct
                  </span>
                </th>
              ))}
            </tr>
          </thead>
          <tbody className="divide-y divide-ink/5 font-mono">
            {preview.rows.map((row, rowIndex) => (
              <tr key={rowIndex}>
                {row.map((value, columnIndex) => (
                  <td key={columnIndex} className="px-3 py-1 whitespace-nowrap text-ink-soft">
                    {value}
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <figcaption className="text-xs text-ink-soft">
        {name}: the first {preview.rows.length} rows; types and distinct values counted {sampled}.
      </figcaption>
    </figure>
  );
}
