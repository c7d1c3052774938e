-- Rate-limit counters are written on every API request and sign-in attempt. As an unlogged table
-- their writes skip the write-ahead log, so a request no longer waits for a WAL flush (several
-- milliseconds on a busy disk). What is lost is only what a crash would lose anyway: PostgreSQL
-- empties unlogged tables after a crash, which restarts every one-minute or 15-minute window.
ALTER TABLE "rate_limits" SET UNLOGGED;
