/**
 * The one way chart tooltips are written. ECharts puts a formatter's answer into the page as HTML, so every name
 * and label in it (an athlete's name, a flight's label, a series name) goes through {@link escapeHtml}: an athlete
 * called `<b>x</b>` shows those characters, never bold text. Tooltips are built from plain-text lines with
 * {@link tooltipHtml}; only the line breaks and ECharts' own colour marker are markup.
 */

const ENTITIES: Record<string, string> = { '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' };

/** Text made safe for HTML element content and quoted attribute values. */
export function escapeHtml(text: unknown): string {
  return String(text ?? '').replace(/[&<>"']/g, (c) => ENTITIES[c] ?? c);
}

/** A tooltip from lines of plain text, each escaped; empty lines are left out. */
export function tooltipHtml(...lines: (string | null | undefined | false)[]): string {
  return lines.filter((l): l is string => typeof l === 'string' && l.length > 0).map(escapeHtml).join('<br/>');
}

/** What ECharts hands an axis tooltip's formatter for each series under the pointer. */
export interface AxisTooltipItem {
  seriesName?: string;
  value?: unknown;
  /** ECharts' coloured dot for the series: markup ECharts makes itself from the series colour. */
  marker?: unknown;
  axisValueLabel?: string;
}

/**
 * A formatter for `trigger: 'axis'` tooltips: the axis value on the first line, then `name: value` per series,
 * every text escaped. `valueText` writes one series value (e.g. `12.3 ft`), `headText` the axis value.
 */
export function axisTooltip(valueText: (value: unknown) => string, headText?: (axisValueLabel: string) => string) {
  return (params: AxisTooltipItem | AxisTooltipItem[]): string => {
    const items = Array.isArray(params) ? params : [params];
    if (items.length === 0) return '';
    const head = items[0].axisValueLabel ?? '';
    // A point of an x/y series comes as [x, y]: the tooltip shows y against the axis value x.
    const shown = (v: unknown) => valueText(Array.isArray(v) ? v[v.length - 1] : v);
    const rows = items.map((p) => `${typeof p.marker === 'string' ? p.marker : ''}${escapeHtml(`${p.seriesName ?? ''}: ${shown(p.value)}`)}`);
    return [escapeHtml(headText ? headText(head) : head), ...rows].filter(Boolean).join('<br/>');
  };
}
