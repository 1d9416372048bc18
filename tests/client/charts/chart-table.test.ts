import { describe, expect, it } from 'vitest';
import { chartSummary, chartTable } from '../../../src/components/charts/chart-table';

describe('chart text alternatives', () => {
  const option = {
    xAxis: { type: 'value', name: 'Time since release (s)' },
    yAxis: { type: 'value', name: 'Speed (m/s)' },
    series: [
      { name: 'Speed |v|', type: 'line', data: [[0, 24.1234], [0.5, 22.9]] },
      { name: 'Apex', type: 'scatter', data: [{ value: [1.2, 8.7], name: 'apex' }] },
      { name: 'Nothing yet', type: 'line', data: [] },
    ],
  };

  it('names the kinds of series, their names and the axes in the summary when the option has them', () => {
    expect(chartSummary(option)).toBe('Chart (line, points): Speed |v|, Apex; axes Time since release (s) and Speed (m/s). "Show as table" lists its data.');
  });

  it('lists one table a series with data, headed by the axis names, numbers to at most three decimals', () => {
    const tables = chartTable(option);
    expect(tables.map((t) => t.caption)).toEqual(['Speed |v|', 'Apex']);
    expect(tables[0]).toEqual({ caption: 'Speed |v|', columns: ['Time since release (s)', 'Speed (m/s)'], rows: [['0', '24.123'], ['0.5', '22.9']] });
    expect(tables[1]!.rows).toEqual([['1.2', '8.7']]);
  });

  it('reads a category axis, a time axis and a heat map value column when the chart uses them', () => {
    const day = Date.UTC(2026, 10, 30);
    expect(chartTable({ xAxis: { type: 'category', name: 'Session', data: ['Mon', 'Tue'] }, series: [{ name: 'Carry', data: [40, null] }] })[0]!.rows).toEqual([
      ['Mon', '40'],
      ['Tue', '—'],
    ]);
    expect(chartTable({ xAxis: { type: 'time' }, series: [{ name: 'Carry', data: [[day, 41.5]] }] })[0]!.rows).toEqual([['2026-11-30', '41.5']]);
    const heat = chartTable({ xAxis: [{ name: 'speed' }], yAxis: [{ name: 'angle' }], series: [{ type: 'heatmap', name: 'Carry', data: [[20, 35, 39.25]] }] })[0]!;
    expect(heat.columns).toEqual(['speed', 'angle', 'Value']);
    expect(heat.rows).toEqual([['20', '35', '39.25']]);
  });
});
