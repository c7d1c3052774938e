// The job queue (pg-boss in PostgreSQL): the web app sends analysis jobs, workers run them.
export {
  ANALYSIS_JOB_POLICY,
  ANALYSIS_QUEUE,
  analysisJobSchema,
  type AnalysisJob,
} from "./analysis-queue";
export { startBoss, type BossOptions } from "./boss";
export { enqueueAnalysis, enqueueFederatedAnalysis, stopSendingBoss } from "./enqueue";
export {
  FEDERATED_JOB_POLICY,
  FEDERATED_QUEUE,
  federatedJobSchema,
  type FederatedJob,
} from "./federated-queue";
