import { spawn, type ChildProcess, type SpawnOptions } from "node:child_process";
import { openSync, closeSync } from "node:fs";

type StopFunction = () => Promise<void>;

export interface SpawnRequest {
  name: string;
  command: string;
  args: string[];
  cwd?: string;
  env?: NodeJS.ProcessEnv;
  /** Run as this user and group (the caller must be root), e.g. PostgreSQL as `postgres`. */
  uid?: number;
  gid?: number;
  /** Write the child's output to this file instead of the terminal. */
  logFile?: string;
  /** The signal that asks this program to shut down cleanly. */
  stopSignal?: NodeJS.Signals;
}

export interface SupervisedProcess {
  readonly pid: number;
  /** Resolves with the exit code (or 1 when ended by a signal) whenever the process ends. */
  readonly exited: Promise<number>;
  /** True once stop() was called, so the exit that follows is expected. */
  readonly stopRequested: boolean;
  stop(): Promise<void>;
}

/** A part kept running by `keepRunning`, whose process changes when it is restarted. */
export interface KeptService {
  /** The process running now (the latest restart's). */
  readonly current: SupervisedProcess;
  /** Calls `listener` with each new process once it has been started again after a death. */
  onRestart(listener: (process: SupervisedProcess) => void): void;
  stop(): Promise<void>;
}

export interface RestartPolicy {
  /** The wait before the first restart; it doubles with each death soon after a start. */
  firstDelayMs: number;
  longestDelayMs: number;
  /** A process that ran this long before dying counts as healthy: the wait starts over. */
  healthyAfterMs: number;
  /** Runs before each restart, e.g. to clear up after the dead process. */
  beforeRestart?(): Promise<void>;
}

const defaultRestartPolicy: RestartPolicy = {
  firstDelayMs: 1000,
  longestDelayMs: 30_000,
  healthyAfterMs: 60_000,
};

const gracePeriodMs = 15_000;

/**
 * Owns every process and in-process service an orchestrator starts, and stops them all (newest
 * first) on Ctrl-C, SIGTERM or an uncaught error. A long-running part that dies is restarted
 * (`keepRunning`), with backoff, while the rest keeps serving.
 * Children get their own process group, so a terminal's Ctrl-C reaches only the orchestrator, which
 * then shuts them down in order (the app before the database it uses), and so stopping a child
 * also stops whatever it forked.
 */
export class Supervisor {
  private readonly stops: { name: string; stop: StopFunction }[] = [];
  private shuttingDown: Promise<void> | undefined;

  /** Stops everything on signals and crashes, then exits the orchestrator. */
  installExitHandlers() {
    const stopOnSignal = (code: number) => {
      if (!this.isShuttingDown) console.log("\nStopping every process this command started …");
      this.exitAfterShutdown(code);
    };
    process.on("SIGINT", () => stopOnSignal(130));
    process.on("SIGTERM", () => stopOnSignal(143));
    process.on("SIGHUP", () => stopOnSignal(129));
    process.on("uncaughtException", (error) => {
      console.error(error);
      this.exitAfterShutdown(1);
    });
    process.on("unhandledRejection", (reason) => {
      console.error(reason);
      this.exitAfterShutdown(1);
    });
  }

  /** Stops everything, then ends the orchestrator with this exit code. */
  exitAfterShutdown(code: number) {
    void this.shutdown().finally(() => process.exit(code));
  }

  get isShuttingDown(): boolean {
    return this.shuttingDown !== undefined;
  }

  /** Registers something started in this process (a fake server, say) to stop on shutdown. */
  register(name: string, stop: StopFunction) {
    this.stops.push({ name, stop });
  }

  /**
   * Starts a long-running program and starts it again whenever it dies while the orchestrator is
   * not shutting down: after 1 s, then 2 s, 4 s … at most 30 s while it keeps dying soon after
   * starting (the wait starts over once a run lasted a minute). Each death and restart is one line
   * on the orchestrator's output. Stopping it stops whichever process runs at the time.
   */
  keepRunning(request: SpawnRequest, policy: Partial<RestartPolicy> = {}): KeptService {
    const settings = { ...defaultRestartPolicy, ...policy };
    const listeners: ((process: SupervisedProcess) => void)[] = [];
    let current = this.spawnSupervised(request, { register: false });
    let delayMs = settings.firstDelayMs;
    let pendingRestart: ReturnType<typeof setTimeout> | undefined;
    let stopped = false;

    const restart = async () => {
      pendingRestart = undefined;
      if (stopped || this.isShuttingDown) return;
      try {
        await settings.beforeRestart?.();
        if (stopped || this.isShuttingDown) return;
        current = this.spawnSupervised(request, { register: false });
      } catch (error) {
        console.error(
          `Could not restart ${request.name}: ${error instanceof Error ? error.message : error}`,
        );
        scheduleRestart(-1);
        return;
      }
      console.log(`${request.name} restarted (pid ${current.pid}).`);
      watch(current);
      for (const listener of listeners) listener(current);
    };
    const scheduleRestart = (code: number) => {
      const cause = code < 0 ? "restart failed" : `exit code ${code}`;
      console.error(
        `\n${request.name} stopped unexpectedly (${cause}); restarting in ${delayMs / 1000} s.`,
      );
      if (request.logFile) console.error(`Its log: ${request.logFile}`);
      pendingRestart = setTimeout(() => void restart(), delayMs);
      delayMs = Math.min(settings.longestDelayMs, delayMs * 2);
    };
    const watch = (process: SupervisedProcess) => {
      const startedAt = Date.now();
      void process.exited.then((code) => {
        if (stopped || this.isShuttingDown || process.stopRequested) return;
        if (Date.now() - startedAt >= settings.healthyAfterMs) delayMs = settings.firstDelayMs;
        scheduleRestart(code);
      });
    };
    watch(current);

    const stop = async () => {
      stopped = true;
      clearTimeout(pendingRestart);
      this.unregister(stop);
      await current.stop();
    };
    this.register(request.name, stop);
    return {
      get current() {
        return current;
      },
      onRestart: (listener) => void listeners.push(listener),
      stop,
    };
  }

  /** Runs a program to completion (a build, a check) and resolves with its exit code. */
  async runToCompletion(request: SpawnRequest): Promise<number> {
    const child = this.spawnSupervised(request);
    const code = await child.exited;
    await child.stop();
    return code;
  }

  /** Stops everything registered, newest first; safe to call more than once. */
  shutdown(): Promise<void> {
    this.shuttingDown ??= (async () => {
      for (const { name, stop } of [...this.stops].reverse()) {
        try {
          await stop();
        } catch (error) {
          console.error(`Could not stop ${name} cleanly:`, error);
        }
      }
      this.stops.length = 0;
    })();
    return this.shuttingDown;
  }

  private unregister(stop: StopFunction) {
    const index = this.stops.findIndex((entry) => entry.stop === stop);
    if (index >= 0) this.stops.splice(index, 1);
  }

  /**
   * Spawns a child in its own process group. Registered, its stop runs at shutdown; a kept
   * service registers one stop for all its restarts instead, keeping its place in the order.
   */
  private spawnSupervised(
    request: SpawnRequest,
    { register }: { register: boolean } = { register: true },
  ): SupervisedProcess {
    if (this.isShuttingDown) throw new Error(`not starting ${request.name}: shutting down`);
    const logDescriptor = request.logFile ? openSync(request.logFile, "a") : undefined;
    const options: SpawnOptions = {
      cwd: request.cwd,
      env: request.env ?? process.env,
      detached: true,
      stdio: logDescriptor === undefined ? "inherit" : ["ignore", logDescriptor, logDescriptor],
      uid: request.uid,
      gid: request.gid,
    };
    const child = spawn(request.command, request.args, options);
    if (logDescriptor !== undefined) closeSync(logDescriptor);
    const exited = waitForExit(child, request.name);
    const pid = child.pid;
    if (pid === undefined) {
      // spawn failed (e.g. the program does not exist); `exited` carries the error.
      return { pid: -1, exited, stopRequested: false, stop: async () => undefined };
    }
    let stopRequested = false;
    const stop = () => {
      stopRequested = true;
      this.unregister(stop);
      return stopProcessGroup(pid, exited, request.stopSignal ?? "SIGTERM");
    };
    if (register) this.register(request.name, stop);
    return {
      pid,
      exited,
      get stopRequested() {
        return stopRequested;
      },
      stop,
    };
  }
}

function waitForExit(child: ChildProcess, name: string): Promise<number> {
  return new Promise((resolve) => {
    child.once("error", (error) => {
      console.error(`Could not run ${name}: ${error.message}`);
      resolve(127);
    });
    child.once("exit", (code, signal) => resolve(code ?? (signal ? 1 : 0)));
  });
}

async function stopProcessGroup(pid: number, exited: Promise<number>, signal: NodeJS.Signals) {
  if (!signalGroup(pid, signal)) return;
  const timer = new Promise<"timeout">((resolve) =>
    setTimeout(() => resolve("timeout"), gracePeriodMs).unref(),
  );
  if ((await Promise.race([exited, timer])) === "timeout") {
    signalGroup(pid, "SIGKILL");
    await exited;
  }
  // Forked helpers that outlived the group leader get no grace period.
  signalGroup(pid, "SIGKILL");
}

/** Signals a whole process group; false when it no longer exists. */
function signalGroup(pid: number, signal: NodeJS.Signals): boolean {
  try {
    process.kill(-pid, signal);
    return true;
  } catch {
    return false;
  }
}
