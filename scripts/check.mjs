// The project's whole check, the command the README gives and CI runs: typecheck, lint, the
// unit suite and the browser end-to-end suite, then ONE closing line of totals over all suites:
// `N passed, N failed`. Typecheck and lint count as one check each. Exits non-zero on any failure.
//
//   node scripts/check.mjs            everything
//   node scripts/check.mjs --no-e2e   without the browser suite (when no Chromium is installed)
import { spawnSync } from "node:child_process";
import { existsSync, mkdirSync, readFileSync, rmSync } from "node:fs";

const startedAll = Date.now();
const withE2e = !process.argv.includes("--no-e2e");
const outDir = "test-output";
mkdirSync(outDir, { recursive: true });

// Minutes each step may take before it is killed: a hung synchronous loop must not eat CI.
const LIMIT_MIN = { typecheck: 10, lint: 10, unit: 25, e2e: 25 };

function run(name, command, args, minutes) {
  console.log(`\n── ${name}: ${command} ${args.join(" ")}`);
  const started = Date.now();
  const result = spawnSync("timeout", ["--kill-after=30", `${minutes * 60}`, command, ...args], { stdio: "inherit" });
  const seconds = ((Date.now() - started) / 1000).toFixed(1);
  const ok = result.status === 0;
  console.log(`── ${name}: ${ok ? "ok" : `FAILED (exit ${result.status ?? result.signal})`} in ${seconds} s`);
  return ok;
}

function vitestCounts(file) {
  if (!existsSync(file)) return null;
  try {
    const report = JSON.parse(readFileSync(file, "utf8"));
    return {
      passed: report.numPassedTests ?? 0,
      failed: (report.numFailedTests ?? 0) + countFilesFailedWithoutTests(report),
      skipped: (report.numPendingTests ?? 0) + (report.numTodoTests ?? 0),
    };
  } catch {
    return null;
  }
}

// A test file that failed only because some of its tests failed is already counted by its
// tests; a file that failed without a failing test (syntax error, import error, a failing
// hook) counts as one failure. (numFailedTestSuites is not used: vitest counts describe
// blocks there too, so one failing test inside a describe counted twice.)
function countFilesFailedWithoutTests(report) {
  return (report.testResults ?? []).filter((s) => s.status === "failed" && !(s.assertionResults ?? []).some((t) => t.status === "failed")).length;
}

let passed = 0;
let failed = 0;
let skipped = 0;
const tally = (ok) => (ok ? (passed += 1) : (failed += 1));

tally(run("typecheck", "npm", ["run", "--silent", "typecheck"], LIMIT_MIN.typecheck));
tally(run("lint", "npm", ["run", "--silent", "lint"], LIMIT_MIN.lint));
// The command line exactly as a user reaches it after `npm install` (the bin entry through npx).
tally(run("npx loopwright --help", "sh", ["-c", "npx loopwright --help | grep -q 'Usage: loopwright'"], 2));

const suites = [["unit", ["vitest", "run"], `${outDir}/unit.json`]];
if (withE2e) suites.push(["e2e", ["sh", "-c", "vite build >/dev/null && vitest run --config vitest.e2e.config.ts \"$@\"", "e2e"], `${outDir}/e2e.json`]);
for (const [name, cmd, report] of suites) {
  rmSync(report, { force: true });
  const extra = ["--reporter=default", "--reporter=json", `--outputFile.json=${report}`];
  const ok = run(name, "npx", [...cmd, ...extra], LIMIT_MIN[name]);
  const counts = vitestCounts(report);
  if (counts) {
    passed += counts.passed;
    failed += Math.max(counts.failed, ok ? 0 : 1);
    skipped += counts.skipped;
  } else {
    failed += 1; // the suite did not even produce a report
  }
}

console.log(`\nall checks took ${((Date.now() - startedAll) / 1000).toFixed(0)} s`);
console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ""}`);
process.exit(failed === 0 ? 0 : 1);
