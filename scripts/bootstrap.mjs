#!/usr/bin/env node
// First step of `npm start` and `npm test` on any machine, including a fresh clone: it runs before
// node_modules exists, so it uses Node's standard library only. It makes sure the npm dependencies
// and the Debian packages are present, then hands over to scripts/start.ts or scripts/test.ts.
import { execFileSync, spawn, spawnSync } from "node:child_process";
import { existsSync, statSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";

const projectRoot = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");

/** Debian packages each command needs; PostgreSQL for both, the browser and Python references for tests. */
const systemPackages = {
  start: ["postgresql"],
  test: [
    "postgresql",
    "chromium",
    "python3-sklearn",
    "python3-pandas",
    "python3-scipy",
    "python3-mpmath",
  ],
};

const entryScripts = { start: "scripts/start.ts", test: "scripts/test.ts" };

function fail(message) {
  console.error(`\npartita: ${message}`);
  process.exit(1);
}

function checkNodeVersion() {
  const [major, minor] = process.versions.node.split(".").map(Number);
  const supported = (major === 20 && minor >= 19) || major >= 22;
  if (!supported) {
    fail(`Node.js ${process.versions.node} is too old; Partita needs 20.19+ (or 22+).`);
  }
}

function modifiedTime(file) {
  return existsSync(file) ? statSync(file).mtimeMs : undefined;
}

/** npm ci writes node_modules/.package-lock.json; older than package-lock.json means stale. */
function installNodeModulesWhenStale() {
  const lockTime = modifiedTime(path.join(projectRoot, "package-lock.json"));
  const installedTime = modifiedTime(path.join(projectRoot, "node_modules", ".package-lock.json"));
  if (installedTime !== undefined && lockTime !== undefined && installedTime >= lockTime) return;
  console.log("partita: installing npm dependencies (npm ci) …");
  const npm = process.platform === "win32" ? "npm.cmd" : "npm";
  const result = spawnSync(npm, ["ci", "--no-audit", "--no-fund"], {
    cwd: projectRoot,
    stdio: "inherit",
  });
  if (result.status !== 0) fail("npm ci failed; see the output above.");
}

function isDebianPackageInstalled(name) {
  try {
    const status = execFileSync("dpkg-query", ["-W", "-f=${Status}", name], {
      encoding: "utf8",
      stdio: ["ignore", "pipe", "ignore"],
    });
    return status.trim() === "install ok installed";
  } catch {
    return false;
  }
}

function hasDpkg() {
  return spawnSync("dpkg-query", ["--version"], { stdio: "ignore" }).status === 0;
}

function installSystemPackagesWhenMissing(command) {
  if (!hasDpkg()) {
    console.warn(
      "partita: not a Debian-like system (no dpkg-query); assuming these are installed: " +
        systemPackages[command].join(", "),
    );
    return;
  }
  const missing = systemPackages[command].filter((name) => !isDebianPackageInstalled(name));
  if (missing.length === 0) return;
  const installCommand = `apt-get update && apt-get install -y ${missing.join(" ")}`;
  if (process.getuid?.() !== 0) {
    fail(
      `missing system packages: ${missing.join(", ")}.\n` +
        `Install them as root, then run this command again:\n\n  sudo sh -c '${installCommand}'\n`,
    );
  }
  console.log(`partita: installing system packages: ${missing.join(", ")} …`);
  const aptEnvironment = { ...process.env, DEBIAN_FRONTEND: "noninteractive" };
  for (const args of [["update"], ["install", "-y", ...missing]]) {
    const result = spawnSync("apt-get", args, { stdio: "inherit", env: aptEnvironment });
    if (result.status !== 0) fail(`\`apt-get ${args.join(" ")}\` failed; see the output above.`);
  }
}

/**
 * One Node process with tsx as a loader (not the tsx CLI, which adds a process in between), so a
 * signal reaches the orchestrator directly. The react-server condition lets it import db/ modules,
 * which import "server-only".
 */
function runEntryScript(command, extraArguments) {
  const child = spawn(
    process.execPath,
    ["--conditions=react-server", "--import", "tsx", entryScripts[command], ...extraArguments],
    { cwd: projectRoot, stdio: "inherit" },
  );
  // Ctrl-C reaches the whole foreground group, the child included; a signal sent to this process
  // alone must still reach it. The orchestrator treats a repeated signal as the same request.
  for (const signal of ["SIGINT", "SIGTERM", "SIGHUP"]) {
    process.on(signal, () => child.kill(signal));
  }
  child.on("exit", (code, signal) => process.exit(code ?? (signal ? 1 : 0)));
}

const [command, ...extraArguments] = process.argv.slice(2);
if (command !== "start" && command !== "test") {
  fail("usage: node scripts/bootstrap.mjs start|test");
}
checkNodeVersion();
installNodeModulesWhenStale();
installSystemPackagesWhenMissing(command);
runEntryScript(command, extraArguments);
