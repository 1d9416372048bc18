/**
 * The heatmap and its continuous visual map for ECharts (the Planner's carry map only draws them): imported by that
 * chart beside `echarts-setup.ts`.
 */
import { use } from 'echarts/core';
import { HeatmapChart } from 'echarts/charts';
import { VisualMapContinuousComponent } from 'echarts/components';

use([HeatmapChart, VisualMapContinuousComponent]);
