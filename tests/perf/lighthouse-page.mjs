// Runs Lighthouse on one page several times and prints each run's figures as JSON. Plain JavaScript on
// purpose: Lighthouse sends functions into the page as source text, and a TypeScript runner's injected helpers
// would not exist there.
import fs from 'node:fs';
import lighthouse, { desktopConfig } from 'lighthouse';

const [url, port, form, cookie, reportPath, runsArg] = process.argv.slice(2);
const runs = Math.max(1, Number(runsArg) || 1);
const valid = [];
const failures = [];
// Lighthouse now and then fails to record a trace (NO_NAVSTART): such a run is left out and one more is made.
for (let attempt = 0; valid.length < runs && attempt < runs + 2; attempt++) {
  const result = await lighthouse(
    url,
    {
      port: Number(port),
      output: 'json',
      logLevel: 'error',
      onlyCategories: ['performance', 'accessibility'],
      extraHeaders: cookie ? { Cookie: cookie } : undefined,
    },
    form === 'desktop' ? desktopConfig : undefined,
  );
  const lhr = result.lhr;
  if (lhr.runtimeError) {
    failures.push(lhr.runtimeError.message);
    continue;
  }
  if (reportPath) {
    const n = valid.length + 1;
    fs.writeFileSync(reportPath.replace(/\.json$/, `-${n}.json`), JSON.stringify(lhr));
    if (process.env.LIGHTHOUSE_TRACE) fs.writeFileSync(reportPath.replace(/\.json$/, `-${n}.trace.json`), JSON.stringify(result.artifacts.Trace));
  }
  valid.push(lhr);
}
if (!valid.length) {
  process.stdout.write(JSON.stringify({ runtimeError: failures.join('; '), runs: [] }));
  process.exit(0);
}
process.stdout.write(
  JSON.stringify({
    runtimeError: null,
    runs: valid.map((lhr) => {
      const a11yIds = new Set(lhr.categories.accessibility.auditRefs.map((r) => r.id));
      return {
        performance: lhr.categories.performance.score ?? 0,
        accessibility: lhr.categories.accessibility.score ?? 0,
        lcpMs: lhr.audits['largest-contentful-paint'].numericValue,
        tbtMs: lhr.audits['total-blocking-time'].numericValue,
        cls: lhr.audits['cumulative-layout-shift'].numericValue,
        failedA11y: Object.values(lhr.audits)
          .filter((a) => a.score === 0 && a11yIds.has(a.id))
          .map((a) => a.id),
      };
    }),
  }),
);
