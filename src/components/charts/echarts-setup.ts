/**
 * The one place ECharts is configured: only the charts (line, scatter, heatmap) and components (grid, tooltip,
 * plain legend, mark point and line, the heatmap's continuous visual map) the screens use are registered, which keeps the bundle
 * small: register a new one here when a chart needs it. Import `VChart` from here rather than from vue-echarts directly.
 */
import { use } from 'echarts/core';
import { CanvasRenderer } from 'echarts/renderers';
import { BarChart, HeatmapChart, LineChart, ScatterChart } from 'echarts/charts';
import {
  GridComponent,
  LegendPlainComponent,
  MarkLineComponent,
  MarkPointComponent,
  TooltipComponent,
  VisualMapContinuousComponent,
} from 'echarts/components';
import VChart from 'vue-echarts';

use([
  CanvasRenderer,
  LineChart,
  BarChart,
  ScatterChart,
  HeatmapChart,
  GridComponent,
  TooltipComponent,
  LegendPlainComponent,
  MarkPointComponent,
  MarkLineComponent,
  VisualMapContinuousComponent,
]);

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
 * Whether charts should animate: browser tests set `window.__ARCWRIGHT_NO_ANIMATION__ = true`
 * before load so that screenshots are taken of finished charts.
 */
export function chartAnimation(): boolean {
  return !(globalThis as { __ARCWRIGHT_NO_ANIMATION__?: boolean }).__ARCWRIGHT_NO_ANIMATION__;
}

export { VChart };
