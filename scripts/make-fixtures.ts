// Generates the demo recordings in fixtures/ with their true modes (*.truth.json) and
// fixtures/README.md. Every file is the output of one `keel simulate` command line, listed in
// FIXTURES below and printed into the README beside the file, so each can be regenerated alone.
//
//   npx tsx scripts/make-fixtures.ts
//
// Sizes are kept small (the whole set under ~5 MB): the 20-minute ambient files carry a subset
// of the channels (the reference angle, the angles that show the three tracked modes, the
// corridor flow) with 3 decimals.
import { mkdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { TARROW_MECHANICAL_NOISE_MW } from '../fixtures/tarrow-network';
import { DEFAULT_LOAD_NOISE, EXCITATION_GAIN, EXCITATION_ZERO_MW, transferAtDampingPercent } from '../modal/simulator';
import { simulateCommand } from './keel';

const DIR = path.resolve(__dirname, '../fixtures');

interface Fixture {
  file: string;
  what: string;
  args: string[];
}

const AMBIENT_CHANNELS = 'tarrow-central.angle,moorgate.angle,saltreach-bay.angle,windlow.angle,greyscar.angle,moorgate.mw';

const FIXTURES: Fixture[] = [
  {
    file: 'ambient-1500mw-20min.csv',
    what: '20 minutes of ambient data at a moderate Highmoor–Saltreach transfer (north–south mode ample, ≈6 %)',
    args: ['--kind', 'ambient', '--minutes', '20', '--transfer-mw', '1500', '--seed', '101', '--channels', AMBIENT_CHANNELS, '--decimals', '3'],
  },
  {
    file: 'ambient-2600mw-20min.csv',
    what: '20 minutes of ambient data at a high transfer (north–south mode poor, under 3 %)',
    args: ['--kind', 'ambient', '--minutes', '20', '--transfer-mw', '2600', '--seed', '102', '--channels', AMBIENT_CHANNELS, '--decimals', '3'],
  },
  {
    file: 'ringdown-line-trip-2000mw.csv',
    what: 'line trip (one of the four Highmoor–Saltreach circuits) at 2000 MW: 5 s before, 40 s after; all channels',
    args: ['--kind', 'ringdown', '--event', 'line-trip', '--seconds', '40', '--pre-event', '5', '--transfer-mw', '2000', '--seed', '103', '--decimals', '4'],
  },
  {
    file: 'ringdown-generator-loss-1200mw.cfg',
    what: 'loss of 800 MW at Gullhaven at 1200 MW transfer, COMTRADE 2013 ASCII pair (.cfg + .dat): 5 s before, 30 s after',
    args: ['--kind', 'ringdown', '--event', 'generator-loss', '--seconds', '30', '--pre-event', '5', '--transfer-mw', '1200', '--seed', '104', '--format', 'comtrade'],
  },
];

function fmt(x: number, d: number): string {
  return x.toFixed(d);
}

function main(): void {
  mkdirSync(DIR, { recursive: true });
  const sections: string[] = [];
  let total = 0;
  for (const fx of FIXTURES) {
    const out = path.join(DIR, fx.file);
    const result = simulateCommand([...fx.args, '--out', out]);
    const files = (result.files as string[]).map((f) => path.basename(f));
    const truth = {
      file: fx.file,
      files,
      description: fx.what,
      command: `npm run --silent keel -- simulate ${fx.args.join(' ')} --out fixtures/${fx.file}`,
      seed: result.seed,
      transferMw: result.transferMw,
      kind: result.kind,
      rate: result.rate,
      startTime: result.startTime,
      samples: result.samples,
      channels: result.channels,
      ...(result.event !== undefined ? { event: result.event, eventTime: result.eventTime, eventSecondsFromStart: result.eventSecondsFromStart } : {}),
      note:
        result.kind === 'ringdown'
          ? 'trueModes are the eigenvalues of the post-event model (line trip: three corridor circuits left)'
          : 'trueModes are the eigenvalues of the model at this transfer',
      trueModes: result.trueModes,
    };
    const truthFile = fx.file.replace(/\.(csv|cfg)$/, '.truth.json');
    writeFileSync(path.join(DIR, truthFile), `${JSON.stringify(truth, null, 2)}\n`);
    const sizes = files.map((f) => statSync(path.join(DIR, f)).size);
    total += sizes.reduce((a, b) => a + b, 0) + statSync(path.join(DIR, truthFile)).size;
    const modes = (result.trueModes as { track: string | null; label: string; frequencyHz: number; dampingPercent: number }[])
      .filter((m) => m.track !== null)
      .map((m) => `| ${m.label} | ${fmt(m.frequencyHz, 3)} Hz | ${fmt(m.dampingPercent, 2)} % |`);
    sections.push(
      [
        `### ${files.join(' + ')}`,
        '',
        fx.what + '.',
        '',
        `- command: \`${truth.command}\``,
        `- seed: ${truth.seed}; transfer ${truth.transferMw} MW; ${truth.rate} frames/s; ${truth.samples} samples per channel; ${files.map((f, i) => `${f} ${(sizes[i] / 1024).toFixed(0)} KiB`).join(', ')}`,
        `- true modes: \`${truthFile}\``,
        '',
        '| tracked mode | frequency | damping |',
        '| --- | --- | --- |',
        ...modes,
        '',
      ].join('\n'),
    );
  }
  const unitNoise = Object.entries(TARROW_MECHANICAL_NOISE_MW)
    .map(([m, mw]) => `${m}: like a ${mw} MW load, ${(DEFAULT_LOAD_NOISE * mw).toFixed(0)} MW RMS`)
    .join('; ');
  const p5 = transferAtDampingPercent('north-south', 5)!;
  const p3 = transferAtDampingPercent('north-south', 3)!;
  const readme = [
    '# Fixtures',
    '',
    'Demo recordings of the invented Tarrow Interconnection, made by the project\'s own simulator',
    '(`modal/simulator/`, a linearised classical-model system; DESIGN.md §5.6). Each recording\'s true',
    'modes are the eigenvalues of the simulator\'s state matrix, written beside it as `*.truth.json`, so',
    'every file doubles as a test with a known answer. Nothing here is real data.',
    '',
    '- `tarrow-network.ts`: the network (areas, sites, channels, corridors, mode tracks) and the',
    '  simulator\'s machine, line and load data.',
    '- Regenerate everything: `npx tsx scripts/make-fixtures.ts` (rewrites this README too).',
    '  Each file below is also the output of the single `keel simulate` command shown beside it.',
    '',
    '## Calibration of the north–south mode',
    '',
    'The loss of damping at high transfer is a stated simplification: an excitation damping torque on',
    'the Highmoor hydro equivalent that falls linearly with the Highmoor–Saltreach transfer',
    `(D_exc/M = ${EXCITATION_GAIN.toFixed(4)} · (${EXCITATION_ZERO_MW.toFixed(1)} − P)/1000 s⁻¹, negative above ${EXCITATION_ZERO_MW.toFixed(0)} MW),`,
    'calibrated to 9.0 % at 500 MW and 3.0 % at 2500 MW. The north–south damping crosses',
    `**5 % at ${p5.toFixed(0)} MW** and **3 % at ${p3.toFixed(0)} MW** (modal/simulator/model.ts, checked in model.test.ts).`,
    '',
    '## Ambient drive',
    '',
    'Every load fluctuates randomly (the RMS of its 1-second average is 0.3 % of the load), and so does',
    `the mechanical power of the Greyscar hydro units (${unitNoise}; turbulent flow through penstock`,
    'and turbine, TARROW_MECHANICAL_NOISE_MW in fixtures/tarrow-network.ts). That unit noise is what excites the',
    'Greyscar local mode, which load changes elsewhere in Highmoor barely reach; it acts on the rotor',
    'only, so the operating point, the true modes and the calibration above are unchanged by it.',
    '',
    '## Files',
    '',
    ...sections,
    `Total size: ${(total / 1024 / 1024).toFixed(2)} MiB.`,
    '',
  ].join('\n');
  writeFileSync(path.join(DIR, 'README.md'), readme);
  process.stdout.write(`${readFileSync(path.join(DIR, 'README.md'), 'utf8')}`);
}

main();
