// The status JSON the API and the progress page read. The rule under test is the API contract
// written in lib/api/schemas.ts: a running analysis always names a stage; a queued one names none.
import { describe, expect, it } from "vitest";
import type { AnalysisStatusView } from "@/db/queries/analyses";
import { toStatusJson } from "@/lib/reports/analysis-status";

const at = new Date(Date.UTC(2026, 0, 1, 9));
const view = (status: AnalysisStatusView["status"], stage: string | null): AnalysisStatusView => ({
  status,
  stage,
  fraction: 0,
  failureMessage: null,
  attempts: 1,
  title: "Penguins",
  createdAt: at,
  startedAt: status === "queued" ? null : at,
  finishedAt: null,
  simulationProgress: null,
  workerLostAt: null,
  storageUnreachableSince: null,
  reportId: null,
  simulates: false,
});

describe("toStatusJson", () => {
  it("names the first stage for a running analysis whose worker has not reported yet", () => {
    expect(toStatusJson(view("running", null)).stage).toBe("reading");
  });

  it("keeps the stage the worker wrote, and none while queued", () => {
    expect(toStatusJson(view("running", "fitting")).stage).toBe("fitting");
    expect(toStatusJson(view("queued", null)).stage).toBeNull();
  });
});
