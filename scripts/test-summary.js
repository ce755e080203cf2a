// Prints one closing line over every runner: "Total: N passed, N failed". Exits 1 when a
// runner's report is missing, so a runner that did not run cannot pass silently.
const { existsSync, readFileSync } = require('node:fs');

let passed = 0;
let failed = 0;
let skipped = 0;
let missing = false;
for (const file of process.argv.slice(2)) {
  if (!existsSync(file)) {
    console.error(`missing test report: ${file}`);
    missing = true;
    continue;
  }
  const report = JSON.parse(readFileSync(file, 'utf8'));
  if ('numPassedTests' in report) {
    passed += report.numPassedTests;
    failed += report.numFailedTests + (report.numRuntimeErrorTestSuites ?? 0);
    skipped += report.numPendingTests + report.numTodoTests;
  } else if (report.stats) {
    passed += report.stats.expected + report.stats.flaky;
    failed += report.stats.unexpected;
    skipped += report.stats.skipped;
  }
}
console.log(`\nTotal: ${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`);
process.exit(missing || failed > 0 || passed === 0 ? 1 : 0);
