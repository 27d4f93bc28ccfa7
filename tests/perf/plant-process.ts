import { startPlant } from '../../server/opcua/plant';

// The load benchmark's plant in a process of its own (as a real one is): started with the number of tags, it
// answers with its address; after 'start' each tag has a new value for every sample, 'stop' answers how many
// values it gave. Mode 'sampled' (default): the server measures a tag when it samples it (source time = sample
// time). Mode 'set': the plant sets every tag once a second on its own clock and the server samples the value last
// set, so a value waits up to a sampling interval in the server before it is sampled (the server's share).
type Msg = { cmd: 'start' | 'stop' | 'close' };

async function main() {
  const [n, pkiFolder, userName, password, mode = 'sampled'] = process.argv.slice(2);
  const tags = Array.from({ length: Number(n) }, (_, i) => `L-${String(i + 1).padStart(3, '0')}`);
  let written = 0;
  let k = 0;
  let running = false;
  const index = new Map(tags.map((t, i) => [t, i]));
  const measure = (tag: string, at: Date) => {
    if (!running) return null;
    written++;
    return 59 + 0.5 * Math.sin(at.getTime() / 7000 + index.get(tag)!);
  };
  const plant = await startPlant({
    pkiFolder: pkiFolder!,
    users: [{ userName: userName!, password: password! }],
    tags,
    ...(mode === 'sampled' ? { measure } : {}),
  });
  let ticker: ReturnType<typeof setInterval> | null = null;
  process.on('message', async (m: Msg) => {
    if (m.cmd === 'start' && mode === 'sampled') running = true;
    if (m.cmd === 'start' && mode !== 'sampled')
      ticker = setInterval(() => {
        const at = new Date();
        k++;
        tags.forEach((tag, i) => plant.set(tag, 59 + 0.5 * Math.sin(k / 7 + i) + 0.001 * (k % 10), { at }));
        written += tags.length;
      }, 1000);
    if (m.cmd === 'stop') {
      running = false;
      if (ticker) clearInterval(ticker);
      process.send!({ written });
    }
    if (m.cmd === 'close') {
      await plant.close();
      process.exit(0);
    }
  });
  process.send!({ endpointUrl: plant.endpointUrl, tags, nodeIds: tags.map(plant.nodeIdOf) });
}

void main();
