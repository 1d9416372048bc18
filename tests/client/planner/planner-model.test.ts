import { describe, expect, it } from 'vitest';
import { airFromConditions, bestAngle, plannerGrid, sensitivities, standardAtmosphere, vacuumFlight, type CarryGrid } from '../../../shared/physics';
import {
  altitudeForPressure, bestAngleRidge, blankSetup, carryMapSpeedAxis, checkInput, conditionsChanged, DEFAULT_BLANK, equalScaleExtent,
  formatDelta, gridToHeatmap, inputsFromSetup, roundTo, sensitivityRows, setupFromInputs, shownRange, sliderSpecs, toShown, toSiValue,
  vacuumPath,
} from '../../../src/components/planner/planner-model';

const setup = blankSetup(DEFAULT_BLANK);
const start = inputsFromSetup(setup);
const specs = sliderSpecs(start);
const spec = (key: string) => {
  const found = specs.find((s) => s.key === key);
  if (!found) throw new Error(`no slider ${key}`);
  return found;
};

describe('slider values', () => {
  it('round-trips every slider value through display units when the club is imperial', () => {
    for (const s of specs) {
      for (const si of [s.min, (s.min + s.max) / 2, s.max]) {
        expect(toSiValue(toShown(si, s, 'imperial'), s, 'imperial')).toBeCloseTo(si, 9);
        expect(toSiValue(toShown(si, s, 'metric'), s, 'metric')).toBeCloseTo(si, 9);
      }
    }
  });

  it('shows speed in mph and temperature in °F when the club is imperial', () => {
    expect(toShown(10, spec('speed'), 'imperial')).toBeCloseTo(22.369363, 5);
    expect(toShown(293.15, spec('temperatureK'), 'imperial')).toBeCloseTo(68, 9);
    expect(toShown(293.15, spec('temperatureK'), 'metric')).toBeCloseTo(20, 9);
    expect(toShown(30, spec('angleDeg'), 'imperial')).toBe(30);
  });

  it('widens the range to whole steps when the ends fall between steps', () => {
    const r = shownRange(spec('temperatureK'), 'metric');
    expect(r).toEqual({ min: -10, max: 45, step: 0.5 });
    const f = shownRange(spec('temperatureK'), 'imperial');
    expect(f.min).toBeLessThanOrEqual(14);
    expect(f.max).toBeGreaterThanOrEqual(113);
  });

  it('folds floating-point dust away when rounding to a step', () => {
    expect(roundTo(24.137 + 0.1, 0.1)).toBe(24.2);
    expect(roundTo(0.1 + 0.2, 0.05)).toBe(0.3);
  });

  it('refuses a typed speed above the engine limit with the range in the club units', () => {
    expect(checkInput('speed', 200, spec('speed'), 'metric')).toBe('Launch speed must lie between 0.1 and 150 m/s.');
    expect(checkInput('speed', 20, spec('speed'), 'metric')).toBeNull();
    expect(checkInput('height', Number.NaN, spec('height'), 'metric')).toBe('Launch height needs a number.');
  });
});

describe('setupFromInputs', () => {
  it('keeps the original air when no weather slider moved', () => {
    const now = { ...start, speed: start.speed + 3 };
    expect(conditionsChanged(start, now)).toBe(false);
    expect(setupFromInputs(setup, start, now).air).toBe(setup.air);
  });

  it('recomputes the air from the sliders when the altitude moves', () => {
    const now = { ...start, altitudeM: 1600 };
    const air = setupFromInputs(setup, start, now).air;
    expect(air.densityKgM3).toBeCloseTo(airFromConditions({ airTemperatureK: 288.15, altitudeM: 1600, relativeHumidityPct: 50 }).densityKgM3, 12);
    expect(air.densityKgM3).toBeLessThan(setup.air.densityKgM3);
  });

  it('finds the altitude of a pressure as the inverse of the standard atmosphere when starting from a fit', () => {
    for (const z of [0, 350, 1600, 4200]) expect(altitudeForPressure(standardAtmosphere(z).pressurePa)).toBeCloseTo(z, 6);
    const at1600 = { ...setup, air: airFromConditions({ altitudeM: 1600, airTemperatureK: 297.15 }) };
    expect(inputsFromSetup(at1600).altitudeM).toBeCloseTo(1600, 6);
  });
});

describe('formatDelta', () => {
  it('signs a gain with + and a loss with the minus sign', () => {
    expect(formatDelta(2.345, 'length', 'metric')).toBe('+2.3 m');
    expect(formatDelta(-1.26, 'length', 'metric')).toBe('−1.3 m');
    expect(formatDelta(-0.12, null, 'metric', { digits: 2, symbol: 's' })).toBe('−0.12 s');
    expect(formatDelta(1.5, null, 'metric', { symbol: '°' })).toBe('+1.5°');
  });

  it('shows ±0 when the change rounds to nothing', () => {
    expect(formatDelta(0.04, 'length', 'metric')).toBe('±0.0 m');
    expect(formatDelta(-0.04, 'length', 'metric')).toBe('±0.0 m');
  });

  it('converts a change of temperature without the offset of the scale when the club is imperial', () => {
    expect(formatDelta(10, 'temperature', 'imperial')).toBe('+18.0 °F');
    expect(formatDelta(3.048, 'length', 'imperial')).toBe('+10.0 ft');
  });
});

describe('vacuumPath', () => {
  it('lands where the closed-form no-air flight lands when released from a height', () => {
    const launch = { speed: 20, angleDeg: 40, height: 1.8 };
    const path = vacuumPath(launch);
    expect(path.x[path.x.length - 1]).toBeCloseTo(vacuumFlight(launch).carry, 9);
    expect(path.y[0]).toBe(1.8);
    expect(path.y[path.y.length - 1]).toBeCloseTo(0, 9);
  });
});

describe('equalScaleExtent', () => {
  it('gives both axes the same metres per pixel whichever need is larger', () => {
    const wide = equalScaleExtent(60, 10, 600, 300);
    expect(wide.xMax / 600).toBeCloseTo(wide.yMax / 300, 12);
    expect(wide.xMax).toBe(60);
    const tall = equalScaleExtent(20, 30, 600, 300);
    expect(tall.yMax).toBe(30);
    expect(tall.xMax).toBeCloseTo(60, 12);
  });
});

describe('carry map', () => {
  const grid = plannerGrid(setup, { min: 10, max: 30, steps: 11 }, { min: 0, max: 80, steps: 41 });

  it('maps every grid cell to [column, row, carry] in display units', () => {
    const heat = gridToHeatmap(grid, 'imperial');
    expect(heat.cells).toHaveLength(11 * 41);
    const cell = heat.cells.find(([c, r]) => c === 4 && r === 20);
    expect(cell?.[2]).toBeCloseTo(grid.carry[20][4] / 0.3048, 9);
    expect(heat.max).toBeCloseTo(Math.max(...grid.carry.flat()) / 0.3048, 9);
    expect(heat.min).toBe(0);
  });

  it('follows the best angle of each speed within a tenth of a degree of Brent when the rows are 2° apart', () => {
    const ridge = bestAngleRidge(grid);
    expect(ridge).toHaveLength(11);
    for (const point of ridge) {
      const exact = bestAngle(setup, { speed: point.speed });
      expect(Math.abs(point.angleDeg - exact.angleDeg)).toBeLessThan(0.1);
      expect(point.carry).toBeCloseTo(exact.carry, 1);
      expect(point.angleDeg).toBeLessThan(45);
    }
  });

  it('leaves out a column that never leaves the ground', () => {
    const flat: CarryGrid = { speeds: [0, 5], anglesDeg: [0, 10, 20], carry: [[0, 0], [0, 1], [0, 1.5]], flightTime: [], apexHeight: [] };
    expect(bestAngleRidge(flat)).toEqual([{ speed: 5, angleDeg: 20, carry: 1.5 }]);
  });

  it('spans every flight with room either side when the speeds differ', () => {
    expect(carryMapSpeedAxis([20, 28, 24])).toEqual({ min: 12, max: 40 });
    expect(carryMapSpeedAxis([])).toEqual({ min: 6, max: 42 });
    expect(carryMapSpeedAxis([140]).max).toBe(150);
  });
});

describe('sensitivityRows', () => {
  it('gives carry per mph as carry per m/s times the size of a mph when the club is imperial', () => {
    const sens = sensitivities(setup);
    const metric = sensitivityRows(sens, 'metric');
    const imperial = sensitivityRows(sens, 'imperial');
    expect(metric[0].perUnitSi).toBeCloseTo(sens.carryPerSpeed, 12);
    expect(imperial[0].perUnitSi).toBeCloseTo(sens.carryPerSpeed * 0.44704, 12);
    expect(imperial[0].label).toBe('Carry per 1 mph more launch speed');
    expect(metric[0].value.startsWith('+')).toBe(true);
  });
});
