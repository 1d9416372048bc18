import { describe, expect, it } from 'vitest';
import { plannerGrid } from '../../../shared/physics';
import { blankSetup, CARRY_MAP_ANGLES, DEFAULT_BLANK } from '../../../src/components/planner/planner-model';
import { createCarryMapClient } from '../../../src/components/planner/carry-map-client';
import { answerCarryMap } from '../../../src/components/planner/carry-map.worker';

const setup = blankSetup(DEFAULT_BLANK);
const speed = { min: 10, max: 30, steps: 11 };

describe('answerCarryMap', () => {
  it('answers with the same grid as the engine when the setup can be flown', () => {
    const answer = answerCarryMap({ id: 7, setup, speed, angleDeg: { ...CARRY_MAP_ANGLES } });
    expect(answer).toEqual({ id: 7, ok: true, grid: plannerGrid(setup, speed, { ...CARRY_MAP_ANGLES }) });
  });

  it('answers with the engine’s sentence when an axis is refused', () => {
    const answer = answerCarryMap({ id: 8, setup, speed: { min: 30, max: 10 }, angleDeg: { ...CARRY_MAP_ANGLES } });
    expect(answer).toEqual({ id: 8, ok: false, message: 'The speed axis needs min < max and 2…501 steps.' });
  });
});

describe('createCarryMapClient', () => {
  it('computes on the page and drops an answer overtaken by a newer request when no worker is available', async () => {
    const client = createCarryMapClient();
    const older = client.compute(setup, speed, { ...CARRY_MAP_ANGLES });
    const newer = client.compute(setup, { min: 12, max: 20, steps: 5 }, { ...CARRY_MAP_ANGLES });
    expect(await older).toBeNull();
    const made = await newer;
    expect(made?.ok).toBe(true);
    if (made?.ok) expect(made.grid.speeds).toEqual([12, 14, 16, 18, 20]);
    client.dispose();
  });
});
