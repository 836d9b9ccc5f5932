// Prints the closing line CI reads: "N passed, N failed" (and skipped), exit code non-zero on any failure.
import fs from "node:fs";
const [file, vitestCode] = process.argv.slice(2);
let passed = 0, failed = 0, skipped = 0;
try {
  const r = JSON.parse(fs.readFileSync(file, "utf8"));
  passed = r.numPassedTests ?? 0;
  failed = (r.numFailedTests ?? 0) + (r.testResults ?? []).filter((t) => t.status === "failed" && (t.assertionResults ?? []).length === 0).length;
  skipped = (r.numPendingTests ?? 0) + (r.numTodoTests ?? 0);
} catch {
  failed = 1; // no report means the runner itself failed
}
if (failed === 0 && Number(vitestCode) !== 0) failed = 1;
console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ""}`);
process.exit(failed > 0 ? 1 : 0);
