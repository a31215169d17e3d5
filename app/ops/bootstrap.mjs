#!/usr/bin/env node
// Entry point of `npm start` and `npm test` on a machine that may have nothing
// installed yet. Uses only Node's own modules: installs the project's packages
// with `npm ci` when they are missing, then hands over to the TypeScript
// orchestrator (start.ts or test.ts) under tsx.
import { spawn, spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
const [, , command, ...rest] = process.argv;
if (!["start", "test"].includes(command)) {
  console.error("usage: node app/ops/bootstrap.mjs start|test");
  process.exit(2);
}

const [major, minor] = process.versions.node.split(".").map(Number);
if (major < 20 || (major === 20 && minor < 19)) {
  console.error(`Dipwell needs Node.js 20.19 or newer; this is ${process.versions.node}.`);
  process.exit(1);
}

const tsx = path.join(root, "node_modules", ".bin", "tsx");
if (!existsSync(tsx) || !existsSync(path.join(root, "node_modules", ".package-lock.json"))) {
  console.log("Installing packages (npm ci)…");
  const r = spawnSync("npm", ["ci", "--no-audit", "--no-fund"], { cwd: root, stdio: "inherit" });
  if (r.status !== 0) {
    console.error("npm ci failed: see the messages above.");
    process.exit(r.status ?? 1);
  }
}

// One process, not tsx's CLI wrapper, so signals reach the orchestrator directly.
const child = spawn(process.execPath, ["--import", "tsx", path.join(root, "app", "ops", `${command}.ts`), ...rest], {
  cwd: root,
  stdio: "inherit",
});
const forward = (signal) => () => child.kill(signal);
process.on("SIGINT", forward("SIGINT"));
process.on("SIGTERM", forward("SIGTERM"));
child.on("exit", (code, signal) => process.exit(code ?? (signal ? 1 : 0)));
