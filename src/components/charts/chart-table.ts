/**
 * Text alternatives of a chart read from its ECharts option: a one-sentence summary (the kinds of series, their
 * names, the axes) and one table a series with the axis names as column heads. Only the plain shapes the screens
 * use are read: data as `[x, y]` or `[x, y, value]` arrays, `{ value: [...] }` objects, or numbers on a category
 * axis; a time axis shows dates.
 */

interface AxisLike {
  type?: string;
  name?: string;
  data?: readonly unknown[];
}

interface SeriesLike {
  name?: string;
  type?: string;
  data?: readonly unknown[];
}

export interface ChartOptionLike {
  xAxis?: AxisLike | readonly AxisLike[];
  yAxis?: AxisLike | readonly AxisLike[];
  series?: SeriesLike | readonly SeriesLike[];
  [key: string]: unknown;
}

export interface ChartTable {
  caption: string;
  columns: string[];
  rows: string[][];
}

const KIND_WORDS: Record<string, string> = { line: 'line', scatter: 'points', heatmap: 'heat map' };

function first<T>(value: T | readonly T[] | undefined): T | undefined {
  return Array.isArray(value) ? (value[0] as T | undefined) : (value as T | undefined);
}

function list<T>(value: T | readonly T[] | undefined): T[] {
  if (value === undefined) return [];
  return Array.isArray(value) ? [...(value as readonly T[])] : [value as T];
}

function cell(value: unknown, axis: AxisLike | undefined): string {
  if (value === null || value === undefined || value === '-') return '—';
  if (typeof value === 'number') {
    if (!Number.isFinite(value)) return '—';
    if (axis?.type === 'time') return new Date(value).toISOString().slice(0, 10);
    return String(Number(value.toFixed(3)));
  }
  if (value instanceof Date) return value.toISOString().slice(0, 10);
  return String(value);
}

/** "Line chart: Speed, Upward speed, against Time since release (s) and Speed (m/s)." */
export function chartSummary(option: ChartOptionLike): string {
  const series = list(option.series).filter((s) => (s.data?.length ?? 0) > 0);
  const kinds = [...new Set(series.map((s) => KIND_WORDS[s.type ?? ''] ?? s.type ?? 'chart'))];
  const names = series.map((s) => s.name).filter((n): n is string => !!n);
  const axes = [first(option.xAxis)?.name, first(option.yAxis)?.name].filter((n): n is string => !!n);
  const what = kinds.length ? `Chart (${kinds.join(', ')})` : 'Chart';
  const of = names.length ? `: ${names.join(', ')}` : '';
  const against = axes.length ? `; axes ${axes.join(' and ')}` : '';
  return `${what}${of}${against}. "Show as table" lists its data.`;
}

/** One table a series that has data, its rows in the series' order. */
export function chartTable(option: ChartOptionLike): ChartTable[] {
  const x = first(option.xAxis);
  const y = first(option.yAxis);
  const xName = x?.name ?? 'x';
  const yName = y?.name ?? 'y';
  return list(option.series)
    .filter((s) => (s.data?.length ?? 0) > 0)
    .map((s, index) => {
      const rows = (s.data ?? []).map((d, i) => {
        const value = Array.isArray(d) ? d : d !== null && typeof d === 'object' && 'value' in d ? (d as { value: unknown }).value : d;
        if (Array.isArray(value)) return value.map((v, j) => cell(v, j === 0 ? x : j === 1 ? y : undefined));
        return [cell(x?.data?.[i] ?? i + 1, x), cell(value, y)];
      });
      const width = Math.max(...rows.map((r) => r.length));
      const columns = [xName, yName, 'Value'].slice(0, Math.max(2, width));
      return { caption: s.name ?? `Series ${index + 1}`, columns, rows };
    });
}
