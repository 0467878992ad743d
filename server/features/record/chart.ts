import * as echarts from 'echarts';
import { kgToLb, type Units } from '@shared/rigging';
import type { ReportLineSet } from '@shared/protocol/record';

export const CHART_WIDTH = 520;
export const CHART_HEIGHT = 240;

/**
 * The balance after each step of one line set, as SVG rendered on the server with ECharts (no DOM, no
 * canvas): the plan's computed line, the balance logged when each step was confirmed, and the band the
 * rope lock holds shaded. The same SVG goes on the screen and into the PDF.
 * https://echarts.apache.org/handbook/en/how-to/cross-platform/server/
 */
export function balanceChartSvg(ls: ReportLineSet, units: Units, width = CHART_WIDTH, height = CHART_HEIGHT): string {
  const shown = (kg: number) => Math.round((units === 'imperial' ? kgToLb(kg) : kg) * 10) / 10;
  const unit = units === 'imperial' ? 'lb' : 'kg';
  const limit = shown(ls.ropeLockLimitKg);
  const steps = ['Before', ...ls.steps.map((s) => String(s.index + 1))];
  const planned = [shown(ls.beforeKg), ...ls.steps.map((s) => shown(s.plannedAfterKg))];
  const logged = [shown(ls.beforeKg), ...ls.steps.map((s) => (s.loggedAfterKg === null ? null : shown(s.loggedAfterKg)))];
  const chart = echarts.init(null, null, { renderer: 'svg', ssr: true, width, height });
  chart.setOption({
    animation: false,
    backgroundColor: '#ffffff',
    textStyle: { fontFamily: 'Inter' },
    title: { text: `${ls.name}: balance after each step (${unit}, + pipe-heavy)`, left: 8, top: 4, textStyle: { fontSize: 12, fontWeight: 'bold', color: '#1d1d1d' } },
    legend: { top: 22, right: 8, textStyle: { fontSize: 10 }, data: ['Computed (plan)', 'Logged', `Rope lock ±${limit} ${unit}`] },
    grid: { left: 48, right: 16, top: 48, bottom: 34 },
    xAxis: { type: 'category', data: steps, name: 'Step', nameLocation: 'middle', nameGap: 22, axisLabel: { fontSize: 10 } },
    yAxis: { type: 'value', axisLabel: { fontSize: 10 }, min: (v: { min: number }) => Math.min(v.min, -limit * 1.2), max: (v: { max: number }) => Math.max(v.max, limit * 1.2) },
    series: [
      {
        name: 'Computed (plan)', type: 'line', step: false, data: planned, symbol: 'circle', symbolSize: 5,
        lineStyle: { color: '#1f4e8c', width: 2 }, itemStyle: { color: '#1f4e8c' },
        markLine: { silent: true, symbol: 'none', label: { show: false }, lineStyle: { color: '#555', type: 'solid', width: 1 }, data: [{ yAxis: 0 }] },
      },
      { name: 'Logged', type: 'line', data: logged, connectNulls: false, symbol: 'diamond', symbolSize: 8, lineStyle: { color: '#c26a00', width: 1, type: 'dashed' }, itemStyle: { color: '#c26a00' } },
      {
        name: `Rope lock ±${limit} ${unit}`, type: 'line', data: [], itemStyle: { color: 'rgba(46,125,50,0.35)' },
        markArea: { silent: true, itemStyle: { color: 'rgba(46,125,50,0.15)' }, data: [[{ yAxis: -limit }, { yAxis: limit }]] },
      },
    ],
  });
  const svg = chart.renderToSVGString();
  chart.dispose();
  return svg;
}
