import { compileRates } from '../../src/model/kinetics';
import { productFromWork, simulate, advanceConstant } from '../../src/model/batch';
import { wrightOmega } from '../../src/model/lambert-w';
const e = { tRefC: 60, vmaxRef: 8, eaKJPerMol: 50, kdRefPerH: Math.LN2, edKJPerMol: 300 };
const sub = { s0GPerL: 200, kmGPerL: 15 };
let s = 0;
function time(name: string, f: (i: number) => number) { for (let i = 0; i < 2e5; i++) s += f(i); const t = performance.now(); for (let i = 0; i < 1e6; i++) s += f(i); console.log(name, ((performance.now() - t)).toFixed(0), 'ns'); }
for (let k = 0; k < 2; k++) {
time('compile', (i) => compileRates(e).eaR);
const r = compileRates(e);
time('advance', (i) => { const st = { x: 0, a: 1, kint: 0 }; advanceConstant(r, 1 / (322 + (i & 7)), 24, st); return st.x; });
time('product', (i) => productFromWork(50 + (i & 7), 200, 15));
time('omega', (i) => wrightOmega(5 + (i & 7)));
time('omega<1', (i) => wrightOmega(0.5 - (i & 7)));
time('simulate', (i) => simulate(e, sub, 24, { setpointC: 49 + (i & 7) }).productGPerL);
}
