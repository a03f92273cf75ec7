/** Chart.js as every chart uses it: the parts it draws with registered, and its text set in the shipped Inter like the page around it. */
import { Chart, type ChartComponentLike } from 'chart.js';

export function registerChart(...parts: ChartComponentLike[]) {
  Chart.register(...parts);
  Chart.defaults.font.family = "'Inter Variable', InterVariable, sans-serif";
}
