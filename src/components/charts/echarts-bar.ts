/** Bar charts for ECharts (the workload chart only draws them): imported by that chart beside `echarts-setup.ts`. */
import { use } from 'echarts/core';
import { BarChart } from 'echarts/charts';

use([BarChart]);
