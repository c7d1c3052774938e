import { CATEGORY_COLOURS } from "@/components/reports/charts/chart-style";

const WIDTH = 200;
const HEIGHT = 36;

/**
 * A candidate's label mix at a glance: one column per shard, its classes stacked by share in the
 * report's category colours. Static SVG, so it prints and needs no script.
 */
export function LabelMixStrip({
  name,
  mix,
  categories,
}: {
  name: string;
  mix: number[][];
  categories: string[];
}) {
  const columnWidth = WIDTH / Math.max(1, mix.length);
  return (
    <figure className="space-y-1">
      <svg
        width={WIDTH}
        height={HEIGHT}
        viewBox={`0 0 ${WIDTH} ${HEIGHT}`}
        role="img"
        aria-label={`Label mix of ${name}: ${mix.length} shards, classes ${categories.join(", ")}`}
        className="rounded-sm ring-1 ring-ink/10"
      >
        {mix.map((shares, shard) => {
          let top = 0;
          return shares.map((share, category) => {
            const height = share * HEIGHT;
            const rect = (
              <rect
                key={`${shard}-${category}`}
                x={shard * columnWidth}
                y={top}
                width={columnWidth}
                height={height}
                fill={CATEGORY_COLOURS[category % CATEGORY_COLOURS.length]}
              />
            );
            top += height;
            return rect;
          });
        })}
      </svg>
      <figcaption className="font-mono text-xs text-ink-soft">{name}</figcaption>
    </figure>
  );
}
