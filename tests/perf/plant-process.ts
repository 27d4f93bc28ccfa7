import { startPlant } from '../../server/opcua/plant';

// The load benchmark's plant in a process of its own (as a real one is): started with the number of tags, it
// answers with its address; 'start' makes each tag change once a second, 'stop' answers how many values it wrote.
type Msg = { cmd: 'start' | 'stop' | 'close' };

async function main() {
  const [n, pkiFolder, userName, password] = process.argv.slice(2);
  const tags = Array.from({ length: Number(n) }, (_, i) => `L-${String(i + 1).padStart(3, '0')}`);
  const plant = await startPlant({ pkiFolder: pkiFolder!, users: [{ userName: userName!, password: password! }], tags });
  let written = 0;
  let k = 0;
  let ticker: ReturnType<typeof setInterval> | null = null;
  process.on('message', async (m: Msg) => {
    if (m.cmd === 'start')
      ticker = setInterval(() => {
        const at = new Date();
        k++;
        tags.forEach((tag, i) => plant.set(tag, 59 + 0.5 * Math.sin(k / 7 + i) + 0.001 * (k % 10), { at }));
        written += tags.length;
      }, 1000);
    if (m.cmd === 'stop') {
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
