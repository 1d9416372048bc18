/**
 * The one place ECharts is configured: only the charts (line, scatter) and components (grid, tooltip, plain legend,
 * mark point and line) that most screens use are registered here, which keeps the chart bundle small: register a
 * new one here when a chart needs it. A chart type only one screen draws has its own module beside this one
 * (`echarts-bar.ts`, `echarts-heatmap.ts`), imported by that chart, so that the other screens' bundles leave it out.
 * Import `VChart` from here rather than from vue-echarts directly.
 */
import { use } from 'echarts/core';
import { CanvasRenderer } from 'echarts/renderers';
import { LineChart, ScatterChart } from 'echarts/charts';
import { GridComponent, LegendPlainComponent, MarkLineComponent, MarkPointComponent, TooltipComponent } from 'echarts/components';
import VChart from 'vue-echarts';

use([CanvasRenderer, LineChart, ScatterChart, GridComponent, TooltipComponent, LegendPlainComponent, MarkPointComponent, MarkLineComponent]);

/** Colours of PRODUCT.md's "Look" for charts. */
export const CHART_COLOURS = {
  fitted: '#D97706',
  traced: '#64748B',
  vacuum: '#9CA3AF',
  primary: '#0F766E',
  ink: '#1F2933',
  caution: '#D97706',
  danger: '#B91C1C',
} as const;

/**
 * Whether charts should animate: not when the system asks for reduced motion; browser tests set `window.__ARCWRIGHT_NO_ANIMATION__ = true`
 * before load so that screenshots are taken of finished charts.
 */
export function chartAnimation(): boolean {
  if ((globalThis as { __ARCWRIGHT_NO_ANIMATION__?: boolean }).__ARCWRIGHT_NO_ANIMATION__) return false;
  // A visitor who asked the system for less motion gets the finished chart at once.
  return !(typeof window !== 'undefined' && window.matchMedia?.('(prefers-reduced-motion: reduce)').matches);
}

export { VChart };
