import { describe, expect, it } from 'vitest';
import { isFromPage, isPageState, isPanelModel, isToPage } from '../../extension/logic/panel-protocol';
import { buildPanelModel } from '../../extension/logic/panel-model';
import { RESIDUAL_KINDS } from '../../extension/logic/panel-chart-options';
import { fitNamed, runWith } from './helpers';

const model = buildPanelModel(runWith([fitNamed('newton', ['rise', 'tau'])]), { specUri: 'file:///w/cooling.lsq', specName: 'cooling.lsq' });

describe('extension/logic/panel-protocol', () => {
  it('accepts every well-formed page message', () => {
    for (const m of [
      { type: 'ready' }, { type: 'refit' },
      { type: 'openRow', fit: 'newton', row: 2 }, { type: 'openRow', fit: 'newton', group: 'A', row: 17 },
      { type: 'reveal', fit: 'newton' }, { type: 'reveal', fit: 'newton', param: 'tau' },
      { type: 'export', format: 'markdown' }, { type: 'export', format: 'json' }, { type: 'export', format: 'svg' },
      { type: 'requestCharts', key: 'newton/A' }, { type: 'log', level: 'error', message: 'x' },
    ]) expect(isFromPage(m), JSON.stringify(m)).toBe(true);
  });

  it('rejects malformed page messages', () => {
    for (const m of [
      null, 'ready', [], {}, { type: 'nope' },
      { type: 'openRow', fit: 'newton', row: 0 }, { type: 'openRow', fit: 'newton', row: 2.5 }, { type: 'openRow', row: 2 },
      { type: 'openRow', fit: 'newton', group: 3, row: 2 }, { type: 'reveal' }, { type: 'export', format: 'pdf' },
      { type: 'log', level: 'debug', message: 'x' }, { type: 'requestCharts' },
    ]) expect(isFromPage(m), JSON.stringify(m)).toBe(false);
  });

  it('accepts host messages with a real panel model and rejects broken ones', () => {
    expect(isPanelModel(model)).toBe(true);
    expect(isPanelModel({ ...model, version: 2 })).toBe(false); // a saved state of an older shape
    expect(isToPage({ type: 'show', model })).toBe(true);
    expect(isToPage({ type: 'show', model, focus: 'newton' })).toBe(true);
    expect(isToPage({ type: 'busy', specName: 'a.lsq', text: '1 of 2' })).toBe(true);
    expect(isToPage({ type: 'failed', specName: 'a.lsq', message: 'worker crashed' })).toBe(true);
    expect(isToPage({ type: 'charts', key: 'newton', charts: model.fits[0].charts })).toBe(true);
    expect(isToPage({ type: 'charts', key: 'newton', charts: null })).toBe(true);
    expect(isToPage({ type: 'show', model: { ...model, version: 4 } })).toBe(false);
    expect(isToPage({ type: 'show' })).toBe(false);
    expect(isToPage({ type: 'charts', key: 'newton', charts: [{ id: 'x' }] })).toBe(false);
    expect(isToPage({ type: 'busy', specName: 'a.lsq' })).toBe(false);
  });

  it('checks the saved page state', () => {
    expect(isPageState({})).toBe(true);
    expect(isPageState({ model, selected: 'newton' })).toBe(true);
    expect(isPageState({ model: { fits: [] } })).toBe(false);
    expect(isPageState({ selected: 3 })).toBe(false);
    // the reader's chart choices, every name of extension/logic/panel-chart-options.ts and no other
    for (const kind of RESIDUAL_KINDS) expect(isPageState({ residualKind: { newton: kind } }), kind).toBe(true);
    expect(isPageState({ residualKind: { newton: 'studentized' } })).toBe(false);
    expect(isPageState({ xScale: { newton: 'log' }, residualKind: {} })).toBe(true);
    expect(isPageState({ xScale: { newton: 'sqrt' } })).toBe(false);
  });

  it('survives a JSON round trip (webview state is serialised)', () => {
    const back: unknown = JSON.parse(JSON.stringify({ model, selected: 'newton' }));
    expect(isPageState(back)).toBe(true);
  });
});
