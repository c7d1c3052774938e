// The job queue (pg-boss in PostgreSQL): the web app sends analysis jobs, workers run them.
export {
  ANALYSIS_JOB_POLICY,
  ANALYSIS_QUEUE,
  analysisJobSchema,
  type AnalysisJob,
} from "./analysis-queue";
export {
  ANALYSIS_PART_JOB_POLICY,
  ANALYSIS_PART_QUEUE,
  analysisPartJobSchema,
  type AnalysisPartJob,
} from "./analysis-part-queue";
export { startBoss, type BossOptions } from "./boss";
export {
  enqueueAnalysis,
  enqueueFederatedAnalysis,
  enqueueLayoutPlan,
  stopSendingBoss,
} from "./enqueue";
export {
  FEDERATED_JOB_POLICY,
  FEDERATED_QUEUE,
  federatedJobSchema,
  type FederatedJob,
} from "./federated-queue";
export {
  LAYOUT_PLAN_JOB_POLICY,
  LAYOUT_PLAN_QUEUE,
  layoutPlanJobSchema,
  type LayoutPlanJob,
} from "./layout-plan-queue";
