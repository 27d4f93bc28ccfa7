// Self time by source inside the long tasks after the warm-up, from a Lighthouse trace's CPU profile.
const fs=require('fs');const {SourceMapConsumer}=require('source-map-js');
const [trace,web]=process.argv.slice(2);
const ev=JSON.parse(fs.readFileSync(trace)).traceEvents;
const map=new SourceMapConsumer(JSON.parse(fs.readFileSync(web+'/bundle.map.json','utf8')));
const html=fs.readFileSync(web+'/index.html','utf8');
const parts=JSON.parse(/yieldpoint-bundle-parts" type="application\/json">(.*?)<\/script>/.exec(html)[1]);
const offset=new Map();let acc=0;for(const p of parts){offset.set(p.split('/').pop(),acc);acc+=fs.readFileSync(web+p,'utf8').split('\n').length;}
const main=ev.filter(e=>e.name==='thread_name'&&e.args?.name==='CrRendererMain').find(e=>ev.some(x=>x.pid===e.pid&&x.tid===e.tid&&x.name==='EvaluateScript'&&/index-/.test(x.args?.data?.url??'')));
const mine=ev.filter(e=>e.pid===main.pid&&e.tid===main.tid&&e.ph==='X');
const mark=ev.find(e=>e.name==='yp-warm-done')?.ts;
const tasks=mine.filter(e=>e.name==='RunTask'&&e.dur>(Number(process.env.MIN||12.5)*1000)&&e.ts>mark);
// profile
const chunks=ev.filter(e=>e.name==='ProfileChunk'&&e.pid===main.pid);
const prof=ev.find(e=>e.name==='Profile'&&e.pid===main.pid);if(!prof)throw new Error('no profile');
const nodes=new Map();let t=prof.args.data.startTime;const samples=[];
for(const c of chunks){const d=c.args.data.cpuProfile||{};for(const n of d.nodes||[])nodes.set(n.id,n);const td=c.args.data.timeDeltas||[];(d.samples||[]).forEach((s,i)=>{t+=td[i];samples.push([t,s]);});}
const parent=new Map();for(const n of nodes.values())if(n.parent)parent.set(n.id,n.parent);
const nameOf=id=>{const n=nodes.get(id);const cf=n.callFrame;const f=(cf.url||'').split('/').pop();if(offset.has(f)){const pos=map.originalPositionFor({line:offset.get(f)+cf.lineNumber+1,column:cf.columnNumber});return (pos.source||'?').replace(/^.*node_modules\//,'').replace(/^.*\/main\//,'')+':'+(pos.name||cf.functionName);}return cf.functionName||'('+(cf.url||'native')+')';};
for(const task of tasks){const self=new Map();const incl=new Map();
 for(let i=0;i<samples.length-1;i++){const [ts,id]=samples[i];if(ts<task.ts||ts>task.ts+task.dur)continue;const dt=(samples[i+1][0]-ts)/1000;const k=nameOf(id);self.set(k,(self.get(k)||0)+dt);
  const seen=new Set();for(let p=id;p;p=parent.get(p)){const kk=nameOf(p);if(seen.has(kk))continue;seen.add(kk);incl.set(kk,(incl.get(kk)||0)+dt);}}
 console.log(`=== task +${(task.dur/1000).toFixed(1)} ms`);
 console.log(' self: '+[...self].sort((a,b)=>b[1]-a[1]).slice(0,6).map(([k,v])=>k.slice(-60)+' '+v.toFixed(1)).join(' | '));
 console.log(' incl: '+[...incl].filter(([k])=>!/react-dom|scheduler|metro-require|^\(/.test(k)).sort((a,b)=>b[1]-a[1]).slice(0,Number(process.env.TOP||10)).map(([k,v])=>k.slice(-60)+' '+v.toFixed(1)).join(' | '));}
