/**
 * extension/logic/data-files.ts (what the editor reads for headers) and
 * extension/logic/export-guard.ts (what the editor's export may write): only
 * files inside the workspace folders, only regular files, the header read
 * whole up to the cap (wide headers included), a named pipe refused without
 * blocking; exports checked against the spec and every declared data file
 * by file identity.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { execFileSync } from 'node:child_process';
import { cpSync, linkSync, mkdirSync, mkdtempSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { analyze } from '../../parser';
import { realLocation } from '../../engine/io';
import { dataFileText, firstRecordComplete, HEADER_CAP_BYTES, locateDataFile, readDataHeader, realFolders } from '../../extension/logic/data-files';
import { completeAnalysis, dataRequests } from '../../extension/logic/analysis';
import { specDiagnostics } from '../../extension/logic/diagnostics';
import { completionsAt } from '../../extension/logic/completion';
import { exportRefusal } from '../../extension/logic/export-guard';
import { parse } from '../../parser';

const SAMPLES = join(__dirname, '..', '..', 'samples');
const made: string[] = [];
function temp(): string {
  const d = mkdtempSync(join(tmpdir(), 'lw-ext-data-'));
  made.push(d);
  return realLocation(d);
}
afterAll(() => {
  for (const d of made) rmSync(d, { recursive: true, force: true });
});

/** A workspace folder and a folder outside it. */
function layout() {
  const root = temp();
  const ws = join(root, 'ws');
  const outside = join(root, 'elsewhere');
  mkdirSync(ws);
  mkdirSync(outside);
  writeFileSync(join(ws, 'in.csv'), 'time_min,temp_C\n0,1\n');
  writeFileSync(join(outside, 'secret.csv'), 'secret_col,other\n1,2\n');
  symlinkSync(join(outside, 'secret.csv'), join(ws, 'link-out.csv'));
  return { root, ws, outside };
}

/** The editor's analysis of `text` at `specDir`, headers read as extension/state/headers.ts reads local files. */
async function editorAnalysis(text: string, specDir: string, folders: string[]) {
  const parsed = parse(text);
  const real = await realFolders(folders);
  const data = await Promise.all(
    dataRequests(parsed.ast).map(async (r) => {
      const where = await locateDataFile(join(specDir, r.path), real);
      const base = { name: r.name, path: r.path, pathSpan: r.pathSpan };
      if (!where.inside) return { ...base, state: 'unknown' as const, reason: dataFileText.outside };
      const read = await readDataHeader(where.real, r);
      return { ...base, state: read.state, ...(read.headers ? { headers: read.headers } : {}), ...(read.reason ? { reason: read.reason } : {}) };
    }),
  );
  return completeAnalysis(text, parsed, data);
}

describe('extension/logic/data-files', () => {
  it('reads headers only inside the workspace folders (links resolved)', async () => {
    const { ws, outside } = layout();
    const folders = await realFolders([ws]);
    expect(await locateDataFile(join(ws, 'in.csv'), folders)).toMatchObject({ inside: true, exists: true });
    expect(await locateDataFile(join(ws, 'missing.csv'), folders)).toMatchObject({ inside: true, exists: false });
    expect(await locateDataFile(join(outside, 'secret.csv'), folders)).toEqual({ inside: false });
    expect(await locateDataFile(join(ws, '..', 'elsewhere', 'secret.csv'), folders)).toEqual({ inside: false });
    expect(await locateDataFile(join(ws, 'link-out.csv'), folders)).toEqual({ inside: false });
    expect(await locateDataFile('/etc/passwd', folders)).toEqual({ inside: false });
  });

  it('never shows the columns of a file outside the workspace in completion or diagnostics', async () => {
    const { ws } = layout();
    const text = 'data s = "../elsewhere/secret.csv"\ndata l = "link-out.csv"\nfit f on s {\n  model other = k * secret_\n  param k = 1\n}\n';
    const a = await editorAnalysis(text, ws, [ws]);
    expect(a.data.map((d) => d.state)).toEqual(['unknown', 'unknown']);
    const offset = text.indexOf('secret_') + 'secret_'.length;
    const labels = completionsAt(a, offset).map((c) => c.label);
    expect(labels).not.toContain('secret_col');
    const notes = specDiagnostics(a).filter((d) => d.code === 'data.not_checked');
    expect(notes).toHaveLength(2);
    expect(notes[0]).toMatchObject({ severity: 'info', message: `data file "../elsewhere/secret.csv": ${dataFileText.outside}` });
    // inside the workspace the same header is read and completed
    cpSync(join(ws, '..', 'elsewhere', 'secret.csv'), join(ws, 'copy.csv'));
    const inside = await editorAnalysis(text.replace('../elsewhere/secret.csv', 'copy.csv'), ws, [ws]);
    expect(completionsAt(inside, offset - '../elsewhere/secret.csv'.length + 'copy.csv'.length).map((c) => c.label)).toContain('secret_col');
  });

  it('refuses a named pipe, a folder and a device with a located error, without blocking', async () => {
    const { ws } = layout();
    execFileSync('mkfifo', [join(ws, 'pipe.csv')]);
    mkdirSync(join(ws, 'folder.csv'));
    const text = 'data p = "pipe.csv"\ndata f = "folder.csv"\n';
    const deadline = new Promise<never>((_, reject) => setTimeout(() => reject(new Error('reading a named pipe blocked')), 10_000));
    const a = await Promise.race([editorAnalysis(text, ws, [ws]), deadline]);
    expect(a.data.map((d) => d.state)).toEqual(['unreadable', 'unreadable']);
    const errors = specDiagnostics(a).filter((d) => d.code === 'data.file_unreadable');
    expect(errors.map((e) => [text.slice(e.start, e.end), e.message])).toEqual([
      ['"pipe.csv"', 'data file "pipe.csv" cannot be read: it is a named pipe, not a regular file (only regular files are read)'],
      ['"folder.csv"', 'data file "folder.csv" cannot be read: it is a folder, not a regular file (only regular files are read)'],
    ]);
    expect(await readDataHeader('/dev/zero', {})).toEqual({ state: 'unreadable', reason: 'it is a device, not a regular file (only regular files are read)' });
  });

  it('reads a header wider than 64 KiB whole, and leaves one wider than the cap unchecked rather than cut', async () => {
    const { ws } = layout();
    const wide = Array.from({ length: 8000 }, (_, i) => `column_number_${i}`); // about 150 KiB
    writeFileSync(join(ws, 'wide.csv'), `${wide.join(',')}\n${wide.map(() => '1').join(',')}\n`);
    const read = await readDataHeader(join(ws, 'wide.csv'), {});
    expect(read.state).toBe('found');
    expect(read.headers).toHaveLength(8000);
    expect(read.headers?.at(-1)).toBe('column_number_7999');
    const tooWide = Array.from({ length: Math.ceil(HEADER_CAP_BYTES / 10) + 10 }, (_, i) => `c${i}`.padEnd(9, '_'));
    writeFileSync(join(ws, 'too-wide.csv'), `${tooWide.join(',')}\n1\n`);
    expect(await readDataHeader(join(ws, 'too-wide.csv'), {})).toEqual({ state: 'unknown', reason: dataFileText.tooWide(HEADER_CAP_BYTES) });
    // a quoted header cell with a line break inside is part of the first record
    writeFileSync(join(ws, 'quoted.csv'), '\n\n"time\nmin",temp\n1,2\n');
    expect(await readDataHeader(join(ws, 'quoted.csv'), {})).toMatchObject({ state: 'found', headers: ['time\nmin', 'temp'] });
  });

  it('finds the end of the first record', () => {
    const b = (s: string) => Buffer.from(s, 'utf8');
    expect(firstRecordComplete(b('a,b\n'))).toBe(true);
    expect(firstRecordComplete(b('a,b'))).toBe(false);
    expect(firstRecordComplete(b('\n\n  \na,b\r'))).toBe(true);
    expect(firstRecordComplete(b('"a\nb",c'))).toBe(false);
    expect(firstRecordComplete(b('"a\nb",c\n'))).toBe(true);
  });

  it('reads the sample the same way the checker does', async () => {
    const ws = temp();
    cpSync(join(SAMPLES, 'cooling'), ws, { recursive: true });
    const read = await readDataHeader(join(ws, 'cooling.csv'), {});
    expect(read).toMatchObject({ state: 'found', headers: ['time_min', 'temp_C', 'temp_sd'], line: 'time_min,temp_C,temp_sd' });
  });
});

describe('extension/logic/export-guard', () => {
  /** The cooling sample plus a declared, unused data file; the spec's current plan as the editor has it. */
  function exportCase() {
    const ws = temp();
    cpSync(join(SAMPLES, 'cooling'), ws, { recursive: true });
    writeFileSync(join(ws, 'spare.csv'), 'a\n1\n');
    const text = readFileSync(join(ws, 'cooling.lsq'), 'utf8').replace('const ambient', 'data spare = "spare.csv"\nconst ambient');
    writeFileSync(join(ws, 'cooling.lsq'), text);
    const { plan } = analyze(text);
    return { ws, inputs: { specPath: join(ws, 'cooling.lsq'), declared: plan.data, recorded: [{ name: 'bench', path: 'cooling.csv' }, { name: 'old', path: 'renamed-since.csv' }] } };
  }

  it('refuses the spec, a data file, a link to one, a declared unused file and a file of the exported run', () => {
    const { ws, inputs } = exportCase();
    symlinkSync('cooling.csv', join(ws, 'soft.md'));
    linkSync(join(ws, 'cooling.lsq'), join(ws, 'hard.json'));
    writeFileSync(join(ws, 'renamed-since.csv'), 'x\n');
    const before = ['cooling.csv', 'cooling.lsq', 'spare.csv', 'renamed-since.csv'].map((f) => readFileSync(join(ws, f)));
    const cases: [string, string][] = [
      ['cooling.csv', 'refusing to write cooling.csv (the export): it is the data file "cooling.csv" (data bench); inputs are never written, so nothing was written'],
      ['soft.md', 'refusing to write soft.md (the export): it is the data file "cooling.csv" (data bench) under another name (a link); inputs are never written, so nothing was written'],
      ['hard.json', 'refusing to write hard.json (the export): it is the spec of this run under another name (a link); inputs are never written, so nothing was written'],
      ['cooling.lsq', 'refusing to write cooling.lsq (the export): it is the spec of this run; inputs are never written, so nothing was written'],
      ['spare.csv', 'refusing to write spare.csv (the export): it is the data file "spare.csv" (data spare); inputs are never written, so nothing was written'],
      ['renamed-since.csv', 'refusing to write renamed-since.csv (the export): it is the data file "renamed-since.csv" (data old); inputs are never written, so nothing was written'],
    ];
    for (const [target, message] of cases) expect(exportRefusal(inputs, [join(ws, target)])).toBe(message);
    // one clashing chart among several refuses them all
    expect(exportRefusal(inputs, [join(ws, 'newton-fit.svg'), join(ws, 'cooling.csv')])).toContain('refusing to write cooling.csv');
    expect(exportRefusal(inputs, [join(ws, 'cooling-report.md')])).toBeNull();
    expect(['cooling.csv', 'cooling.lsq', 'spare.csv', 'renamed-since.csv'].map((f) => readFileSync(join(ws, f)))).toEqual(before);
  });
});
