/**
 * The air a flight was computed in, in words and the member's units ("CIPM-2007 from 48.2 °F, 29.92 inHg,
 * 60 % RH"). The engine's own `source` line is in SI for analysts; screens say the same in display units.
 */
import type { Air } from '@shared/physics';
import { formatQuantity, type UnitSystem } from '@/utils/units';

export function airWords(air: Air, units: UnitSystem): string {
  if (air.source.startsWith('ISO 2533')) return air.source;
  const parts: string[] = [];
  if (air.temperatureK !== undefined) parts.push(formatQuantity(air.temperatureK, 'temperature', units));
  if (air.pressurePa !== undefined) parts.push(formatQuantity(air.pressurePa, 'pressure', units));
  if (air.relativeHumidityPct !== undefined) parts.push(`${Math.round(air.relativeHumidityPct)} % RH`);
  if (air.pressurePa === undefined) return parts.length ? `given density (viscosity at ${parts.join(', ')})` : 'given density';
  const assumed = air.source.includes('(assumed') ? ', some values assumed' : '';
  return `CIPM-2007 from ${parts.join(', ')}${assumed}`;
}
