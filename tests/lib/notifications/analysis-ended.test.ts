// The "long analysis finished/failed" e-mail: sent to whoever started the run when it took at least
// LONG_ANALYSIS_SECONDS, with a link to the report (or the progress page on failure), and not when
// they turned it off or left the workspace. Durations are passed in: nothing here is timed.
import { afterAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db/client";
import { saveNotificationSetting } from "@/db/queries/notification-preferences";
import { LONG_ANALYSIS_SECONDS, notifyAnalysisEnded } from "@/lib/notifications/analysis-ended";
import { createAccount, createTeam } from "@/tests/support/accounts";
import { waitForMessage } from "@/tests/support/mailbox";

afterAll(closeDb);

describe("notifyAnalysisEnded", () => {
  it("e-mails a long run's result with a link, and skips short runs", async () => {
    const team = await createTeam();
    const base = {
      workspaceId: team.workspaceId,
      analysisId: "analysis-1",
      title: "Orchard layout",
      startedBy: team.analyst.id,
    };
    const short = await notifyAnalysisEnded({
      ...base,
      seconds: LONG_ANALYSIS_SECONDS - 1,
      run: { outcome: "succeeded", reportId: "r1" },
    });
    expect(short).toBe("short");
    expect(
      await notifyAnalysisEnded({
        ...base,
        seconds: 90,
        run: { outcome: "succeeded", reportId: "r1" },
      }),
    ).toBe("queued");
    const finished = await waitForMessage(team.analyst.email, /^Analysis finished: Orchard layout/);
    expect(finished.text).toContain("after 1.5 minutes");
    expect(finished.text).toContain(`/w/${team.workspaceId}/reports/r1`);

    await notifyAnalysisEnded({
      ...base,
      seconds: 120,
      run: { outcome: "failed", message: "Row 7 of data.csv: column x is not a number." },
    });
    const failed = await waitForMessage(team.analyst.email, /^Analysis failed: Orchard layout/);
    expect(failed.text).toContain("> Row 7 of data.csv: column x is not a number.");
    expect(failed.text).toContain(`/w/${team.workspaceId}/analyses/analysis-1`);
  });

  it("respects the preference and sends nothing to someone outside the workspace", async () => {
    const team = await createTeam();
    await saveNotificationSetting(team.analyst.id, "analysis-finished", false);
    const run = { outcome: "succeeded", reportId: "r1" } as const;
    const base = { workspaceId: team.workspaceId, analysisId: "a", title: "T", seconds: 600, run };
    expect(await notifyAnalysisEnded({ ...base, startedBy: team.analyst.id })).toBe("turned-off");
    const outsider = await createAccount("outsider");
    expect(await notifyAnalysisEnded({ ...base, startedBy: outsider.id })).toBe("not-a-member");
  });
});
