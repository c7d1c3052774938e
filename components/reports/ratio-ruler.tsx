/** The ruler spans ρ from 1/32 to 32 on a log₂ scale; values beyond sit at its ends. */
const SPAN = 5;
const TICKS = [
  { exponent: -4, text: "1/16" },
  { exponent: -2, text: "1/4" },
  { exponent: -1, text: "1/2" },
  { exponent: 0, text: "1" },
  { exponent: 1, text: "2" },
  { exponent: 2, text: "4" },
  { exponent: 4, text: "16" },
];
const WIDTH = 480;
const position = (exponent: number) => ((exponent + SPAN) / (2 * SPAN)) * WIDTH;

/**
 * Where ρ = local / minibatch falls against the verdict thresholds ½ and 2 (methods.md §5), on a
 * log scale so that "twice as good" and "twice as bad" are the same distance from 1.
 */
export function RatioRuler({ ratio }: { ratio: number | null }) {
  const exponent =
    ratio !== null && ratio > 0 ? Math.min(SPAN, Math.max(-SPAN, Math.log2(ratio))) : null;
  return (
    <svg
      viewBox={`-8 0 ${WIDTH + 16} 58`}
      className="h-auto w-full max-w-[520px]"
      role="img"
      aria-label={
        ratio === null
          ? "ρ is undefined: both bounds vanish."
          : `ρ = ${ratio.toPrecision(3)} on a scale where ρ ≤ 1/2 favours local updates and ρ ≥ 2 favours large minibatches.`
      }
    >
      <rect x={0} y={14} width={position(-1)} height={14} className="fill-verdigris-soft" />
      <rect
        x={position(-1)}
        y={14}
        width={position(1) - position(-1)}
        height={14}
        className="fill-paper-deep"
      />
      <rect
        x={position(1)}
        y={14}
        width={WIDTH - position(1)}
        height={14}
        className="fill-indigo-soft"
      />
      <text x={4} y={10} fontSize={10} className="fill-verdigris">
        local updates
      </text>
      <text x={WIDTH / 2} y={10} fontSize={10} textAnchor="middle" className="fill-ink-soft">
        no clear winner
      </text>
      <text x={WIDTH - 4} y={10} fontSize={10} textAnchor="end" className="fill-indigo">
        large minibatches
      </text>
      {TICKS.map((tick) => (
        <g key={tick.text}>
          <line
            x1={position(tick.exponent)}
            x2={position(tick.exponent)}
            y1={28}
            y2={32}
            className="stroke-ink-faint"
          />
          <text
            x={position(tick.exponent)}
            y={43}
            fontSize={10}
            textAnchor="middle"
            className="fill-ink-soft"
          >
            {tick.text}
          </text>
        </g>
      ))}
      {exponent !== null ? (
        <g>
          <line
            x1={position(exponent)}
            x2={position(exponent)}
            y1={11}
            y2={31}
            strokeWidth={3}
            className="stroke-ink"
          />
          <text
            x={position(exponent)}
            y={55}
            fontSize={10}
            fontWeight={700}
            textAnchor="middle"
            className="fill-ink"
          >
            ρ = {(ratio as number).toPrecision(3)}
          </text>
        </g>
      ) : null}
    </svg>
  );
}
