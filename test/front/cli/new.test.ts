import { afterAll, describe, expect, it } from 'vitest';
import { copyFileSync, readdirSync, readFileSync, truncateSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { EXIT } from '../../../engine/front/cli/io';
import { inlineText } from '../../../parser/printable';
import { cleanTemp, cli, SAMPLES, tempDir } from './helpers';

afterAll(cleanTemp);

/** Scaffold, check and fit: each template on data it suits (sample CSVs or written here). */
const CASES: { model: string; csv: string; x: string; y: string }[] = [
  { model: 'line', csv: 'photometer/standards.csv', x: 'conc_mgL', y: 'absorbance' },
  { model: 'polynomial', csv: 'photometer/standards.csv', x: 'conc_mgL', y: 'absorbance' },
  { model: 'exp_decay', csv: 'cooling/cooling.csv', x: 'time_min', y: 'temp_C' },
  { model: 'logistic4', csv: 'doseresponse/assay.csv', x: 'dose_uM', y: 'activity_pct' },
  { model: 'michaelis_menten', csv: 'enzyme/rates.csv', x: 'substrate_mM', y: 'rate_uM_min' },
  { model: 'power', csv: 'enzyme/rates.csv', x: 'substrate_mM', y: 'rate_uM_min' },
  { model: 'arrhenius', csv: 'arrhenius/cure_rates.csv', x: 'temp_C', y: 'k_per_s' },
];

describe('cli/new', () => {
  for (const c of CASES) {
    it(`scaffolds a ${c.model} spec that checks clean and fits`, async () => {
      const dir = tempDir();
      const file = c.csv.split('/')[1];
      copyFileSync(join(SAMPLES, c.csv), join(dir, file));
      const made = await cli(dir, 'new', file, '--x', c.x, '--y', c.y, '--model', c.model, '--out', 'spec.lsq');
      expect(made.code, made.stderr).toBe(EXIT.ok);
      expect(made.stdout).toMatch(/^wrote spec\.lsq: /);
      const text = readFileSync(join(dir, 'spec.lsq'), 'utf8');
      expect(text).toContain(`data `);
      expect(text).toMatch(/# Starting values were computed from the data:\n# {3}\S/);
      const checked = await cli(dir, 'check', 'spec.lsq');
      expect(checked.code, checked.stdout).toBe(EXIT.ok);
      expect(checked.stdout).toBe('');
      const fitted = await cli(dir, 'fit', 'spec.lsq', '--json', '-');
      expect(fitted.code, fitted.stderr).toBe(EXIT.ok);
      expect(JSON.parse(fitted.stdout).fits[0].stop.converged).toBe(true);
    });
  }

  it('scaffolds a Gaussian peak on a baseline from its own data', async () => {
    const dir = tempDir();
    const rows = ['wavelength_nm,signal'];
    for (let i = 0; i <= 60; i++) {
      const x = 500 + i;
      rows.push(`${x},${(2 + 7 * Math.exp(-((x - 531) ** 2) / (2 * 4 ** 2)) + 0.05 * Math.sin(i * 1.7)).toFixed(4)}`);
    }
    writeFileSync(join(dir, 'peak.csv'), rows.join('\n') + '\n');
    const made = await cli(dir, 'new', 'peak.csv', '--model', 'gaussian');
    expect(made.code, made.stderr).toBe(EXIT.ok);
    expect(made.stdout).toMatch(/^wrote peak\.lsq: Gaussian peak on a constant baseline of signal against wavelength_nm\./);
    const fitted = await cli(dir, 'fit', 'peak.lsq', '--json', '-');
    expect(fitted.code).toBe(EXIT.ok);
    const params = Object.fromEntries(JSON.parse(fitted.stdout).fits[0].parameters.map((p: { name: string; estimate: number }) => [p.name, p.estimate]));
    expect(params.center).toBeCloseTo(531, 0);
    expect(params.width).toBeCloseTo(4, 0);
  });

  it('scaffolds a polynomial of the degree asked for (--degree)', async () => {
    const dir = tempDir();
    copyFileSync(join(SAMPLES, 'photometer/standards.csv'), join(dir, 'standards.csv'));
    const r = await cli(dir, 'new', 'standards.csv', '--model', 'polynomial', '--degree', '3', '--out', '-');
    expect(r.code, r.stderr).toBe(EXIT.ok);
    expect(r.stdout).toContain('# polynomial of degree 3: absorbance against conc_mgL');
    expect(r.stdout).toContain('model absorbance = c0 + c1 * conc_mgL + c2 * conc_mgL^2 + c3 * conc_mgL^3');
    expect(r.stdout).toContain('fit cubic on standards {');
  });

  it('scaffolds a 4-parameter logistic for a plate with zero-dose controls, and it fits', async () => {
    const dir = tempDir();
    // invented assay: two untreated (dose 0) wells, then eight doses in duplicate; falling curve
    const rows = ['dose_nM,signal'];
    const f = (d: number) => 12 + (96 - 12) / (1 + (d / 35) ** 1.3);
    const noise = [0.8, -1.1, 0.4, -0.3, 1.2, -0.9, 0.2, 0.6, -0.5, 1.0, -0.7, 0.3, -1.2, 0.9, 0.1, -0.4, 0.7, -0.2];
    let k = 0;
    for (const d of [0, 0, 1, 1, 3, 3, 10, 10, 30, 30, 100, 100, 300, 300, 1000, 1000, 3000, 3000]) rows.push(`${d},${(f(d) + noise[k++]).toFixed(2)}`);
    writeFileSync(join(dir, 'plate.csv'), rows.join('\n') + '\n');
    const made = await cli(dir, 'new', 'plate.csv', '--model', 'logistic4');
    expect(made.code, made.stderr).toBe(EXIT.ok);
    const text = readFileSync(join(dir, 'plate.lsq'), 'utf8');
    expect(text).toContain('zero-dose controls');
    const fitted = await cli(dir, 'fit', 'plate.lsq', '--json', '-');
    expect(fitted.code, fitted.stderr).toBe(EXIT.ok);
    const fit = JSON.parse(fitted.stdout).fits[0];
    expect(fit.stop.converged).toBe(true);
    const est = Object.fromEntries(fit.parameters.map((p: { name: string; estimate: number }) => [p.name, p.estimate]));
    // the invented truth (zero_dose 96, full_dose 12, ec50 35, hill 1.3 in this parameterisation: hill > 0 falls from zero_dose)
    expect(est.zero_dose).toBeCloseTo(96, -0.5);
    expect(est.full_dose).toBeCloseTo(12, -0.5);
    expect(est.ec50).toBeGreaterThan(25);
    expect(est.ec50).toBeLessThan(50);
  });

  it('never overwrites an existing file', async () => {
    const dir = tempDir();
    copyFileSync(join(SAMPLES, 'enzyme/rates.csv'), join(dir, 'rates.csv'));
    writeFileSync(join(dir, 'rates.lsq'), '# mine\n');
    const r = await cli(dir, 'new', 'rates.csv');
    expect(r.code).toBe(EXIT.inputError);
    expect(r.stderr).toBe('error: rates.lsq already exists; choose another --out (existing files are never overwritten)\n');
    expect(readFileSync(join(dir, 'rates.lsq'), 'utf8')).toBe('# mine\n');
    const self = await cli(dir, 'new', 'rates.csv', '--out', 'rates.csv');
    expect(self.code).toBe(EXIT.inputError);
  });

  it('quotes hostile CSV file names in the spec, so the spec reads back the same path and nothing else', async () => {
    const names = ['back\\slash.csv', "it's $(id) `date` ${HOME}.csv", 'semi;colon, comma.csv', 'data #1 [mg].csv', 'tab\there.csv', 'é 漢字 😀.csv', '-dash.csv'];
    for (const name of names) {
      const dir = tempDir();
      copyFileSync(join(SAMPLES, 'enzyme/rates.csv'), join(dir, name));
      const made = await cli(dir, 'new', `./${name}`, '--out', 'spec.lsq', '--model', 'michaelis_menten');
      expect(made.code, `${name}: ${made.stderr}`).toBe(EXIT.ok);
      const plan = await cli(dir, 'plan', 'spec.lsq');
      expect(plan.code, `${name}: ${plan.stderr}`).toBe(EXIT.ok);
      const parsed = JSON.parse(plan.stdout) as { data: { path: string }[]; fits: unknown[] };
      expect(parsed.data.map((d) => d.path)).toEqual([name]);
      expect(parsed.fits).toHaveLength(1);
    }
  });

  it('refuses CSV file names the spec language cannot write (a quote, a line break, a control character), writing nothing', async () => {
    const names = ['we"ird.csv', 'two\nlines.csv', 'car\rriage.csv', 'line\u2028sep.csv', 'para\u2029sep.csv', 'bell\u0007.csv', 'esc\u001b[2J.csv'];
    for (const name of names) {
      const dir = tempDir();
      copyFileSync(join(SAMPLES, 'enzyme/rates.csv'), join(dir, name));
      for (const out of ['spec.lsq', '-']) {
        const r = await cli(dir, 'new', name, '--out', out);
        expect(r.code, name).toBe(EXIT.inputError);
        expect(r.stdout).toBe('');
        expect(r.stderr).toContain(`error: the data path ${inlineText(JSON.stringify(name))} cannot be written in a spec (it contains a double quote, a line break or a control character, and spec text has no escapes); rename the file`);
        // the message itself carries no raw line break or control character
        expect(r.stderr.slice(0, -1)).not.toMatch(/[\u0000-\u001f\u2028\u2029]/);
      }
      expect(readdirSync(dir)).toEqual([name]);
    }
  });

  it('picks the first two numeric columns by default and can write to stdout', async () => {
    const dir = tempDir();
    writeFileSync(join(dir, 'log.csv'), 'label,hours,reading\na,1,2.1\nb,2,3.9\nc,3,6.2\nd,4,7.8\n');
    const r = await cli(dir, 'new', 'log.csv', '--out', '-');
    expect(r.code).toBe(EXIT.ok);
    expect(r.stdout).toContain('model reading = intercept + slope * hours');
    expect(r.stdout).toContain('data log = "log.csv"');
  });

  it('reads only the start of a large CSV: a 1 GiB file works, rows past the sample are not read', async () => {
    const dir = tempDir();
    // 20,000 rows of a calibration line, then a ragged row the sample never reaches, then the file is
    // extended to 1 GiB (sparse: NUL bytes, no disk space); reading it whole would fail
    const rows = Array.from({ length: 20_000 }, (_, i) => `${i * 0.01},${(0.05 + 2.5 * i * 0.01).toFixed(4)}`);
    const path = join(dir, 'big.csv');
    writeFileSync(path, `conc,signal\n${rows.join('\n')}\n1,2,3\n`);
    truncateSync(path, 1 << 30);
    const r = await cli(dir, 'new', 'big.csv', '--out', 'big.lsq');
    expect(r.code, r.stderr).toBe(EXIT.ok);
    expect(r.stdout).toMatch(/^wrote big\.lsq: .*\(The starting values come from the first 10,000 rows of the data; the fit uses every row\.\)\n$/);
    const spec = readFileSync(join(dir, 'big.lsq'), 'utf8');
    expect(spec).toContain('model signal = intercept + slope * conc');
    // the line through the first 10,000 rows: slope 2.5, intercept 0.05 (the rows are exact to 4 decimals)
    expect(Number(/param slope += ([-0-9.e]+)/.exec(spec)![1])).toBeCloseTo(2.5, 3);
    expect(Number(/param intercept += ([-0-9.e]+)/.exec(spec)![1])).toBeCloseTo(0.05, 3);
    // a small file is read whole and says nothing about a sample
    writeFileSync(join(dir, 'small.csv'), `conc,signal\n${rows.slice(0, 50).join('\n')}\n`);
    const small = await cli(dir, 'new', 'small.csv', '--out', '-');
    expect(small.code).toBe(EXIT.ok);
    const whole = await cli(dir, 'new', 'small.csv', '--out', 'small.lsq');
    expect(whole.stdout).not.toContain('first 10,000 rows');
  });

  it('explains unknown columns, templates and unsuitable data', async () => {
    const dir = tempDir();
    copyFileSync(join(SAMPLES, 'photometer/standards.csv'), join(dir, 'standards.csv'));
    const col = await cli(dir, 'new', 'standards.csv', '--x', 'conc');
    expect(col.code).toBe(EXIT.inputError);
    expect(col.stderr).toBe("standards.csv:1: error: no column 'conc' in the data (columns: conc_mgL, absorbance)\n");
    const tpl = await cli(dir, 'new', 'standards.csv', '--model', 'michaelis');
    expect(tpl.stderr).toMatch(/unknown model template 'michaelis'/);
    // concentration 0 cannot enter a power law (0^b)
    const pos = await cli(dir, 'new', 'standards.csv', '--model', 'power');
    expect(pos.code).toBe(EXIT.inputError);
    expect(pos.stderr).toContain('needs every conc_mgL value to be positive');
    const deg = await cli(dir, 'new', 'standards.csv', '--model', 'line', '--degree', '3');
    expect(deg.stderr).toBe('error: --degree goes with --model polynomial\n');
    const bad = await cli(dir, 'new', 'standards.csv', '--model', 'polynomial', '--degree', '2.5');
    expect(bad.code).toBe(EXIT.inputError);
    expect(bad.stderr).toMatch(/--degree must be a whole number from 1 to 20, not '2\.5'/);
    const missing = await cli(dir, 'new', 'nothing.csv');
    expect(missing.stderr).toBe('nothing.csv: error: cannot read file: no such file\n');
  });
});
