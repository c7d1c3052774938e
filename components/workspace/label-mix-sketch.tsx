/**
 * A static sketch of what a report shows first: the label mix of each shard against the pooled
 * mix. Illustration only — the numbers are drawn, not measured.
 */
const SHARDS = [
  [0.2, 0.2, 0.2, 0.2, 0.2],
  [0.55, 0.25, 0.1, 0.05, 0.05],
  [0.05, 0.1, 0.15, 0.3, 0.4],
  [0.2, 0.25, 0.2, 0.2, 0.15],
  [0.1, 0.6, 0.2, 0.05, 0.05],
  [0.3, 0.1, 0.1, 0.1, 0.4],
];
const COLOURS = ["#3d4a9e", "#2f8f83", "#d9652b", "#8a90a0", "#c9b458"];

export function LabelMixSketch() {
  return (
    <svg
      viewBox="0 0 240 120"
      role="img"
      aria-label="Sketch: label mix per shard"
      className="h-auto w-full"
    >
      {SHARDS.map((mix, shard) => {
        let offset = 0;
        return mix.map((share, label) => {
          const height = share * 100;
          const rect = (
            <rect
              key={`${shard}-${label}`}
              x={10 + shard * 38}
              y={110 - offset - height}
              width={28}
              height={height}
              fill={COLOURS[label]}
              opacity={shard === 0 ? 0.45 : 1}
            />
          );
          offset += height;
          return rect;
        });
      })}
      <text x={24} y={119} fontSize={7} textAnchor="middle" fill="#4a5266">
        pooled
      </text>
    </svg>
  );
}
