/** Hover on a column with a declared unit (`data … units COLUMN [UNIT]`) names the unit. */
import { describe, expect, it } from 'vitest';
import { hoverAt } from '../../extension/logic/hover';
import { analysisOf, COOLING } from './helpers';

const WITH_UNITS = COOLING.replace('where time_min >= 0', 'where time_min >= 0 units time_min [min], temp_C [degC]');

describe('extension/logic/hover: column units', () => {
  it('shows the declared unit of a column in the model and in the data statement', () => {
    const a = analysisOf(WITH_UNITS);
    const inModel = WITH_UNITS.indexOf('time_min / tau') + 1;
    expect(hoverAt(a, inModel)?.markdown).toMatch(/^\*\*time_min\*\* — column of `bench` \(cooling\.csv\) \[min\]$/);
    const inUnits = WITH_UNITS.indexOf('temp_C [degC]') + 1;
    expect(hoverAt(a, inUnits)?.markdown).toMatch(/column of `bench`.*\[degC\]$/);
    // a column without a declared unit: as before
    expect(hoverAt(a, WITH_UNITS.indexOf('temp_sd') + 1)?.markdown).toMatch(/column of `bench` \(cooling\.csv\)$/);
  });

  it('without units, the hover is unchanged', () => {
    const a = analysisOf(COOLING);
    expect(hoverAt(a, COOLING.indexOf('time_min / tau') + 1)?.markdown).toMatch(/column of `bench` \(cooling\.csv\)$/);
  });
});
