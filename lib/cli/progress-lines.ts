import type { AnalysisProgress } from "../analysis";

/**
 * Analysis progress as lines on stderr, one per stage and quarter (`partita: fitting 50%`), so a
 * pipeline's log shows movement without a line per pass. `prefix` names what is being analysed
 * when one command runs several analyses (a layout candidate).
 */
export function createProgressPrinter(prefix = ""): (progress: AnalysisProgress) => void {
  let lastStage = "";
  let lastQuarter = -1;
  return ({ stage, fraction }) => {
    const quarter = Math.floor(fraction * 4);
    if (stage === lastStage && quarter === lastQuarter) return;
    lastStage = stage;
    lastQuarter = quarter;
    process.stderr.write(`partita: ${prefix}${stage} ${Math.round(fraction * 100)}%\n`);
  };
}
