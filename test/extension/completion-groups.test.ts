/**
 * Completion of group labels (extension/logic/completion.ts): inside `FIT."` the labels of the fit's `per`
 * column, read from the data by engine/data/labels.ts - the reader the checker's `unknown_group` uses
 * (parser/check-groups.ts) - without the labels the data's `where` removes; after `FIT."GROUP".` the fit's
 * members; and the checker's diagnostic from the same labels.
 */
import { describe, expect, it } from 'vitest';
import { join } from 'node:path';
import { parse } from '../../parser';
import { completionsAt } from '../../extension/logic/completion';
import { completeAnalysis, dataRequests, type DataFileStatus } from '../../extension/logic/analysis';
import { readColumnLabels, readHeaderFile } from '../../engine/data';
import { STATISTICS } from '../../parser/registry';

const plate = join(__dirname, '..', '..', 'samples', 'potency', 'plate.csv');
const SPEC = `data plate = "plate.csv" where sample != "Blank"
fit potency on plate {
  model signal_RLU = bottom + (top - bottom) / (1 + (dose_ng_mL / ec50)^hill)
  param bottom shared
  param top shared
  param hill shared
  param ec50 in [0, inf]
  per sample
}
`;

/** The editor's analysis with the header and the labels of the requested columns read from the sample's file. */
function analysisWithLabels(text: string) {
  const parsed = parse(text);
  const data: DataFileStatus[] = dataRequests(parsed.ast).map((r) => ({
    name: r.name, path: r.path, state: 'found', headers: readHeaderFile(plate)!.headers,
    labels: Object.fromEntries((r.labelColumns ?? []).map((c) => [c, readColumnLabels(plate, c) ?? []])),
  }));
  return completeAnalysis(text, parsed, data);
}

function at(textWithMarker: string) {
  const offset = textWithMarker.indexOf('|');
  const text = textWithMarker.slice(0, offset) + textWithMarker.slice(offset + 1);
  return { items: completionsAt(analysisWithLabels(text), offset), analysis: analysisWithLabels(text) };
}

describe('extension/logic/completion: group labels', () => {
  it('the per column is requested with the header, and its labels are the distinct values of the file', () => {
    const reqs = dataRequests(parse(SPEC).ast);
    expect(reqs[0].labelColumns).toEqual(['sample']);
    // the sample's plate holds the reference, the test lot and blank wells (samples/generate.mjs)
    expect(readColumnLabels(plate, 'sample')).toEqual(['Reference std', 'Test lot 7', 'Blank']);
    expect(readColumnLabels(plate, 'no such column')).toBeUndefined();
    expect(readColumnLabels(join(__dirname, 'missing.csv'), 'sample')).toBeUndefined();
  });

  it('offers the labels inside FIT." in derive and expect, without those the where condition removes', () => {
    const { items } = at(`${SPEC}derive rel = potency."|`);
    expect(items.map((i) => i.label)).toEqual(['Reference std', 'Test lot 7']);
    expect(items[0].kind).toBe('value');
    expect(items[0].insertText).toBeUndefined();
    expect(at(`${SPEC}derive rel = potency."Reference std".ec50 / potency."Te|`).items.map((i) => i.label)).toEqual(['Reference std', 'Test lot 7']);
    expect(at(`${SPEC}expect potency."|`).items.map((i) => i.label)).toEqual(['Reference std', 'Test lot 7']);
  });

  it('offers the fit members after the closing quote and dot, and the members of a parameter in expect', () => {
    const members = at(`${SPEC}derive rel = potency."Reference std".|`).items.map((i) => i.label);
    expect(members).toEqual(expect.arrayContaining(['bottom', 'top', 'hill', 'ec50', ...STATISTICS]));
    expect(at(`${SPEC}expect potency."Test lot 7".|`).items.map((i) => i.label)).toContain('ec50');
    expect(at(`${SPEC}expect potency."Test lot 7".ec50.|`).items.map((i) => i.label)).toEqual(['se', 'lower', 'upper']);
  });

  it('a quoted column elsewhere is still a column, not a label', () => {
    const inModel = at(SPEC.replace('dose_ng_mL / ec50', '"|'));
    expect(inModel.items.map((i) => i.label)).toContain('dose_ng_mL');
  });

  it('the checker reads the same labels: a misspelt label is located, with the nearest label', () => {
    const text = `${SPEC}derive rel = potency."Reference std".ec50 / potency."Test lot7".ec50\nexpect potency."Blank".ec50 below 100\n`;
    const d = analysisWithLabels(text).diagnostics.filter((x) => x.code === 'unknown_group');
    expect(d).toHaveLength(2);
    expect(d[0].suggestions).toEqual(['Test lot 7']);
    expect(text.slice(d[0].range.start.offset, d[0].range.end.offset)).toBe('"Test lot7"');
    // a label the where condition removes is no group
    expect(text.slice(d[1].range.start.offset, d[1].range.end.offset)).toBe('"Blank"');
    expect(analysisWithLabels(`${SPEC}derive rel = potency."Reference std".ec50 / potency."Test lot 7".ec50\n`).diagnostics).toEqual([]);
  });
});
