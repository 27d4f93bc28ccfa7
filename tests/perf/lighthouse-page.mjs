// Runs Lighthouse on one page and prints the figures as JSON. Plain JavaScript on purpose: Lighthouse sends
// functions into the page as source text, and a TypeScript runner's injected helpers would not exist there.
import fs from 'node:fs';
import lighthouse, { desktopConfig } from 'lighthouse';

const [url, port, form, cookie, reportPath] = process.argv.slice(2);
const result = await lighthouse(
  url,
  { port: Number(port), output: 'json', logLevel: 'error', onlyCategories: ['performance', 'accessibility'], extraHeaders: cookie ? { Cookie: cookie } : undefined },
  form === 'desktop' ? desktopConfig : undefined,
);
const lhr = result.lhr;
if (reportPath) fs.writeFileSync(reportPath, JSON.stringify(lhr));
if (reportPath && process.env.LIGHTHOUSE_TRACE) fs.writeFileSync(reportPath.replace(/\.json$/, '.trace.json'), JSON.stringify(result.artifacts.Trace ?? result.artifacts.traces?.defaultPass));
const a11yIds = new Set(lhr.categories.accessibility.auditRefs.map((r) => r.id));
process.stdout.write(
  JSON.stringify({
    performance: lhr.categories.performance.score ?? 0,
    accessibility: lhr.categories.accessibility.score ?? 0,
    lcpMs: lhr.audits['largest-contentful-paint'].numericValue,
    tbtMs: lhr.audits['total-blocking-time'].numericValue,
    cls: lhr.audits['cumulative-layout-shift'].numericValue,
    fcpMs: lhr.audits['first-contentful-paint'].numericValue,
    failedA11y: Object.values(lhr.audits).filter((a) => a.score === 0 && a11yIds.has(a.id)).map((a) => a.id),
    runtimeError: lhr.runtimeError?.message ?? null,
  }),
);
