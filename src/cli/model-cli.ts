// Yieldpoint engine on the command line: one JSON object on stdin, one on stdout; exit 2 on invalid input.
import {
  MODEL_VERSION,
  calibrate,
  ModelInputError,
  fitInactivation,
  halfLifeAt,
  monteCarlo,
  optimizeEconomics,
  optimizeProfile,
  optimizeSetpoint,
  profitCurve,
  economics,
  simulate,
  thermalDose,
  validateCalibrateInput,
  validateDoseInput,
  validateEconomicsInput,
  validateFitInput,
  validateOptimizeInput,
  validateProfileInput,
  validateSimulateInput,
  validateUncertaintyInput,
} from '../model';

const COMMANDS = ['simulate', 'optimize', 'profile', 'fit', 'dose', 'uncertainty', 'economics', 'calibrate'] as const;

function run(command: string, input: unknown): unknown {
  switch (command) {
    case 'simulate': {
      const v = validateSimulateInput(input);
      return { ...simulate(v.enzyme, v.substrate, v.batchH, v.temperature), modelVersion: MODEL_VERSION };
    }
    case 'optimize': {
      const v = validateOptimizeInput(input);
      return { ...optimizeSetpoint(v.enzyme, v.substrate, v.batchH, v.boundsC), modelVersion: MODEL_VERSION };
    }
    case 'profile': {
      const v = validateProfileInput(input);
      const p = optimizeProfile(v.enzyme, v.substrate, v.batchH, v.boundsC, v.stages, v.maxStepC, v.startC);
      return { ...p, modelVersion: MODEL_VERSION };
    }
    case 'fit': {
      const v = validateFitInput(input);
      const f = fitInactivation(v.tRefC, v.points);
      return { ...f, halfLifeRef: halfLifeAt(f, v.tRefC), modelVersion: MODEL_VERSION };
    }
    case 'dose': {
      const v = validateDoseInput(input);
      return { ...thermalDose(v.enzyme, v.substrate, v.log, v.plan, v.batchH, v.refC), modelVersion: MODEL_VERSION };
    }
    case 'uncertainty': {
      const v = validateUncertaintyInput(input);
      return { ...monteCarlo(v), modelVersion: MODEL_VERSION };
    }
    case 'economics': {
      const v = validateEconomicsInput(input);
      const best = optimizeEconomics(v.enzyme, v.substrate, v.boundsC, v.batchBoundsH, v.economics);
      const [lo, hi] = v.batchBoundsH;
      const n = v.curvePoints;
      const lengths = Array.from({ length: n }, (_, i) => (i === n - 1 ? hi : lo * Math.pow(hi / lo, i / (n - 1))));
      const curve = profitCurve(v.enzyme, v.substrate, v.boundsC, lengths, v.economics);
      const plan = v.plan ? economics(v.enzyme, v.substrate, v.plan.batchH, v.plan.temperature, v.economics) : null;
      return { best, curve, plan, modelVersion: MODEL_VERSION };
    }
    case 'calibrate': {
      const v = validateCalibrateInput(input);
      return { ...calibrate(v), modelVersion: MODEL_VERSION };
    }
    default:
      throw new ModelInputError('command', `must be one of ${COMMANDS.join(', ')}`);
  }
}

function readStdin(): Promise<string> {
  return new Promise((resolve, reject) => {
    const chunks: Buffer[] = [];
    process.stdin.on('data', (c: Buffer) => chunks.push(c));
    process.stdin.on('end', () => resolve(Buffer.concat(chunks).toString('utf8')));
    process.stdin.on('error', reject);
  });
}

async function main(): Promise<void> {
  const command = process.argv[2] ?? '';
  let input: unknown;
  try {
    if (!(COMMANDS as readonly string[]).includes(command))
      throw new ModelInputError('command', `must be one of ${COMMANDS.join(', ')}`);
    const text = await readStdin();
    try {
      input = JSON.parse(text);
    } catch {
      throw new ModelInputError('input', 'must be one JSON object');
    }
    const out = run(command, input);
    process.stdout.write(JSON.stringify(out) + '\n');
  } catch (err) {
    if (err instanceof ModelInputError) {
      process.stderr.write(`${err.field}: ${err.rule}\n`);
      process.exitCode = 2;
      return;
    }
    process.stderr.write(`internal error: ${err instanceof Error ? err.message : String(err)}\n`);
    process.exitCode = 1;
  }
}

void main();
