/**
 * (5) CSV ingest speed on a generated 1e6-row file (in os.tmpdir()):
 * `loadDataFile` (streamed read, SHA-256 for provenance, parse to typed
 * columns) and `parseCsvBytes` (parse only, bytes in memory), each timed side
 * by side with papaparse doing the same job (test/data/papa-oracle.ts: whole
 * file read as text, hashed, tokenised), so the speed-up of the scanner is a
 * measured ratio; plus a raw byte scan of the same file (read + count line
 * feeds: the floor of any reader).
 */
import { createHash } from 'node:crypto';
import { readFileSync, statSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { loadDataFile, parseCsvBytes } from '../../../engine/data';
import { papaRead } from '../../data/papa-oracle';
import { compare, measure } from '../harness';
import { gaussian, rng } from '../../fixtures/random';
import { fmt, type BenchRow } from '../report';
import type { BenchContext } from './context';

/** Invented kiln log: site label, minutes, temperature, its standard deviation. */
export function writeKilnCsv(file: string, rows: number): void {
  const g = gaussian(rng(3));
  const parts: string[] = ['site,time_min,temp_C,temp_sd\n'];
  let chunk = '';
  for (let i = 0; i < rows; i++) {
    const t = (i % 1440) * 0.5;
    const temp = 21.5 + 60 * Math.exp(-t / 95) + 0.4 * g();
    chunk += `S${String(i % 50).padStart(2, '0')},${t.toFixed(1)},${temp.toFixed(4)},${(0.3 + 0.1 * ((i * 7) % 5)).toFixed(2)}\n`;
    if (chunk.length > 1 << 20) {
      parts.push(chunk);
      chunk = '';
    }
  }
  parts.push(chunk);
  writeFileSync(file, parts.join(''));
}

function rawScan(file: string): number {
  const buf = readFileSync(file);
  let lines = 0;
  for (let i = 0; i < buf.length; i++) if (buf[i] === 10) lines++;
  return lines;
}

export async function benchCsv(ctx: BenchContext): Promise<BenchRow> {
  const rows = ctx.quick ? 20_000 : 1_000_000;
  const file = path.join(ctx.tmp, 'kiln.csv');
  writeKilnCsv(file, rows);
  const mb = statSync(file).size / 1e6;
  const loaded = loadDataFile(file);
  if (!loaded.ok || loaded.data.table.rowCount !== rows) throw new Error('the generated CSV did not load completely');
  const bytes = readFileSync(file);
  const text = bytes.toString('utf8');
  const runs = ctx.quick ? 1 : 7;
  const papaLoad = () => {
    const content = readFileSync(file);
    createHash('sha256').update(content).digest('hex');
    return papaRead(content.toString('utf8'));
  };
  const load = await compare(() => loadDataFile(file), papaLoad, runs);
  const parse = await compare(() => parseCsvBytes(bytes), () => papaRead(text), runs);
  const scan = await measure(() => rawScan(file), runs);
  const rate = (ms: number) => mb / (ms / 1000);
  const mbps = rate(load.ours.median);
  const speedup = (c: typeof load) => 1 / c.ratio.median;
  return {
    id: 5,
    name: `CSV ingest, ${fmt(rows, 1)} rows (${fmt(mb)} MB)`,
    value: mbps,
    unit: 'MB/s',
    spread: [rate(load.ours.max), rate(load.ours.min)],
    text:
      `${fmt(mbps)} MB/s load (read+hash+parse); parse only ${fmt(rate(parse.ours.median))} MB/s; ` +
      `papaparse path ${fmt(rate(load.other.median))} MB/s load, ${fmt(rate(parse.other.median))} MB/s parse ` +
      `(scanner ${fmt(speedup(load))}× faster load, ${fmt(speedup(parse))}× parse, side by side); ` +
      `raw byte scan ${fmt(rate(scan.median))} MB/s (load ${fmt(load.ours.median / scan.median)}× the scan time)`,
    goal: '≥ 100 MB/s',
    met: mbps >= 100,
    details: {
      rows,
      megabytes: mb,
      loadMs: load.ours,
      parseMs: parse.ours,
      papaparseLoadMs: load.other,
      papaparseParseMs: parse.other,
      scannerOverPapaparseLoad: load.ratio,
      scannerOverPapaparseParse: parse.ratio,
      rawScanMs: scan,
    },
  };
}
