import { db } from "@/db/client";
import { analyses } from "@/db/schema";
import { createTeam } from "@/tests/support/accounts";
import { loadStackedDigitsCsv } from "../../analysis/support/open-data";
import { storeInput } from "./stored-inputs";

/** A dozen pixels (one blanked every 97th row, so imputed) and the ink category. */
const FEATURES = [
  ...["2_3", "2_4", "3_2", "3_5", "4_2", "4_5", "5_3", "5_4", "6_3", "1_4", "6_5"].map(
    (cell) => `pixel_${cell}`,
  ),
  "ink",
];

export const DIGITS_OPTIONS = { labelColumn: "digit", shardColumn: "shard", features: FEATURES };

/**
 * scikit-learn's bundled digits stacked 23 times (41 331 rows, more than the fit's 2 × 20 000-row
 * subsample), with a seeded label-skewed shard column (see open-data.ts).
 */
export const DIGITS_CSV = loadStackedDigitsCsv(23);

/**
 * A queued analysis of the stored digits (or of `content`, the digits changed or in another
 * format, stored as `name`, with other `parameters`) in a new workspace, as the start action
 * leaves it.
 */
export async function queueDigitsAnalysis(
  content: string | Uint8Array = DIGITS_CSV,
  name = "digits.csv",
  parameters: typeof analyses.$inferInsert.parameters = DIGITS_OPTIONS,
): Promise<{ analysisId: string; workspaceId: string }> {
  const team = await createTeam();
  const workspace = { workspaceId: team.workspaceId, uploadedBy: team.owner.id };
  const dataset = await storeInput(workspace, "dataset", name, content);
  const [analysis] = await db()
    .insert(analyses)
    .values({
      workspaceId: team.workspaceId,
      title: "Digits",
      datasetFileId: dataset.id,
      parameters,
      createdBy: team.owner.id,
    })
    .returning({ id: analyses.id });
  return { analysisId: analysis.id, workspaceId: team.workspaceId };
}
