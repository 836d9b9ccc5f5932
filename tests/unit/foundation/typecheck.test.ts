// The whole project (app, lib, broker, tests, benches, scripts) type-checks in strict mode.
import { execFile } from "node:child_process";
import { promisify } from "node:util";
import { expect, it } from "vitest";

it("tsc --noEmit finds no type errors anywhere in the project", async () => {
  const run = promisify(execFile);
  const result = await run(process.execPath, ["node_modules/typescript/bin/tsc", "--noEmit", "-p", "tsconfig.json"], { maxBuffer: 16 << 20 }).then(
    () => "",
    (err: { stdout?: string }) => err.stdout ?? String(err),
  );
  expect(result).toBe("");
}, 300_000);
