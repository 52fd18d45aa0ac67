/**
 * The script of the HTML report, run in the browser: it reads the page's data element and draws
 * the charts with Chart.js (inlined beside it, or loaded just before it from a batch's shared
 * copy), tooltips showing the values under the pointer. Written as a plain function so the
 * compiler checks its syntax; `reportScript` inlines its source. It touches the page only through
 * canvas elements, `textContent`, class names and the `hidden` attribute. When the chart library
 * did not load, it draws nothing: it shows the page's note on it (`#charts-missing`), and each
 * chart box says in one line that its chart is missing.
 */

/* The browser globals the script uses (the project compiles without the DOM library). */
declare const document: any;
declare function getComputedStyle(element: unknown): { getPropertyValue(name: string): string };

function drawReport(ChartLib: any, data: any): void {
  if (typeof ChartLib !== 'function') {
    const note = document.getElementById('charts-missing');
    if (note) note.hidden = false;
    for (const box of Array.from(document.querySelectorAll('.chart')) as any[]) {
      box.className += ' missing';
      const line = document.createElement('p');
      line.className = 'note';
      line.textContent = note ? 'Chart not shown: its chart library did not load (see the note at the top of the page).' : 'Chart not shown: its chart library did not load.';
      box.appendChild(line);
    }
    document.documentElement.setAttribute('data-charts', 'missing');
    return;
  }
  const css = getComputedStyle(document.documentElement);
  const color = (name: string, fallback: string): string => css.getPropertyValue(name).trim() || fallback;
  const ink = color('--ink', '#1f2a36');
  const muted = color('--muted', '#5d6b78');
  const look = data.look;
  ChartLib.defaults.color = muted;
  ChartLib.defaults.font.family = 'system-ui, -apple-system, "Segoe UI", Roboto, "DejaVu Sans", sans-serif';
  ChartLib.defaults.animation = false;
  const fmt = (v: any): string => (typeof v === 'number' && Number.isFinite(v) ? String(Number(v.toPrecision(6))) : '—');
  const baseOptions = (yTitle: string, floor: number | null): any => ({
    responsive: true,
    maintainAspectRatio: false,
    interaction: { mode: 'index', intersect: false },
    plugins: {
      legend: { position: 'top', align: 'end', labels: { usePointStyle: true, boxHeight: 8, color: ink, filter: (item: any) => item.text !== '', sort: (a: any, b: any) => a.datasetIndex - b.datasetIndex } },
      tooltip: { callbacks: { label: (ctx: any) => (ctx.dataset.label ? `${ctx.dataset.label}: ${fmt(ctx.parsed.y)}` : null) }, filter: (item: any) => item.dataset.label !== '' && item.parsed.y !== null },
    },
    scales: {
      x: { type: 'category', ticks: { maxRotation: 0, autoSkip: true, maxTicksLimit: 12 }, grid: { color: look.grid } },
      // a never-negative series: the axis may not run below the floor, but need not reach it
      y: { title: { display: true, text: yTitle }, grid: { color: look.grid }, ...(floor !== null ? { afterDataLimits: (axis: any) => { if (axis.min < floor) axis.min = floor; } } : {}) },
    },
  });
  const line = (label: string, values: any[], c: string, extra: any = {}): any => ({
    label, data: values, borderColor: c, backgroundColor: c, borderWidth: 2, pointRadius: 0, pointHoverRadius: 3, spanGaps: false, fill: false, tension: 0, ...extra,
  });
  /** An interval: the inner level filled, outer levels as dashed edges. */
  const bands = (list: any[]): any[] => {
    const out: any[] = [];
    list.forEach((b: any, i: number) => {
      const label = `${b.level} % interval`;
      if (i === 0) {
        out.push(line(label, b.upper, look.bandFill, { borderWidth: 0, fill: '+1', backgroundColor: look.bandFill, pointStyle: 'rect', order: 5 }));
        out.push(line(`${label} (lower)`, b.lower, look.bandFill, { borderWidth: 0, order: 5, hidden: false }));
      } else {
        out.push(line(label, b.upper, look.bandEdge, { borderWidth: 1.5, borderDash: [6, 4], pointStyle: 'line', order: 4 }));
        out.push(line(`${label} (lower)`, b.lower, look.bandEdge, { borderWidth: 1.5, borderDash: [6, 4], order: 4 }));
      }
    });
    return out;
  };
  const hideLowerInLegend = (opts: any): any => {
    opts.plugins.legend.labels.filter = (item: any) => !/\(lower\)$/.test(item.text);
    return opts;
  };
  const draw = (id: string, config: any): void => {
    const canvas = document.getElementById(id);
    if (canvas) new ChartLib(canvas, config);
  };
  if (data.forecast) {
    const f = data.forecast;
    draw('chart-forecast', {
      type: 'line',
      data: { labels: f.labels, datasets: [line('observed', f.observed, look.observed, { order: 1 }), line('forecast', f.point, look.forecast, { order: 0 }), ...bands(f.bands)] },
      options: hideLowerInLegend(baseOptions(data.valueLabel, f.floor)),
    });
  }
  if (data.holdout) {
    const h = data.holdout;
    draw('chart-holdout', {
      type: 'line',
      data: {
        labels: h.labels,
        datasets: [
          line('observed (training)', h.context, look.context, { borderWidth: 1.25, order: 3 }),
          line('observed (holdout)', h.actual, look.observed, { pointRadius: 2.5, order: 2 }),
          line('forecast from the end of training', h.point, look.forecast, { order: 1 }),
          line('rolling one-step, learning', h.rolling, look.second, { borderDash: [2, 3], order: 1 }),
          ...bands(h.bands),
        ],
      },
      options: hideLowerInLegend(baseOptions(data.valueLabel, h.floor)),
    });
  }
  if (data.periodogram) {
    const p = data.periodogram;
    const q = p.frequency.length;
    const xy = (values: any[]): any[] => values.map((y: any, j: number) => ({ x: p.frequency[j], y }));
    const diag = p.frequency.map((_: number, j: number) => (j + 1) / q);
    const opts = baseOptions('cumulative share of variance', null);
    opts.scales.x = { type: 'linear', min: 0, max: 0.5, title: { display: true, text: 'frequency (cycles per period)' }, grid: { color: look.grid } };
    opts.scales.y.min = 0;
    opts.scales.y.max = 1;
    opts.interaction = { mode: 'nearest', axis: 'x', intersect: false };
    draw('chart-periodogram', {
      type: 'line',
      data: {
        datasets: [
          line('residuals', xy(p.cumulative), look.observed, { stepped: true, order: 0 }),
          line('white noise', xy(diag), look.context, { borderWidth: 1, order: 1 }),
          line('95 % band', xy(diag.map((d: number) => Math.min(1, d + p.band))), look.bound, { borderWidth: 1.25, borderDash: [5, 4], order: 2 }),
          line('', xy(diag.map((d: number) => Math.max(0, d - p.band))), look.bound, { borderWidth: 1.25, borderDash: [5, 4], order: 2 }),
        ],
      },
      options: opts,
    });
  }
  if (data.residuals) {
    const r = data.residuals;
    const b = r.bound;
    const pick = (outside: boolean): any[] => r.values.map((v: any) => (v === null ? null : Math.abs(v) > b === outside ? v : null));
    const largest = r.values.reduce((m: number, v: any) => (v === null ? m : Math.max(m, Math.abs(v))), 0);
    const limit = Math.max(3, Math.ceil(largest + 0.25));
    const opts = baseOptions(`residual ÷ σ̂ (σ̂ = ${fmt(r.scale)})`, null);
    opts.scales.x.ticks.maxTicksLimit = 6;
    opts.scales.y.min = -limit;
    opts.scales.y.max = limit;
    opts.interaction = { mode: 'nearest', axis: 'x', intersect: false };
    opts.plugins.tooltip.filter = (item: any) => !item.dataset.certaBand && item.parsed.y !== null;
    const dots = (label: string, values: any[], c: string, extra: any = {}): any => line(label, values, c, { showLine: false, pointRadius: 2.5, pointHoverRadius: 4, ...extra });
    const flat = (v: number): number[] => r.values.map(() => v);
    draw('chart-residuals', {
      type: 'line',
      data: {
        labels: r.labels,
        datasets: [
          dots('standardised residual', pick(false), look.observed, { order: 0 }),
          dots(`outside ±${b}`, pick(true), look.second, { pointStyle: 'rectRot', pointRadius: 4.5, pointHoverRadius: 6, order: 0 }),
          line(`±${b} band`, flat(b), look.residualBand, { borderWidth: 0, fill: '+1', backgroundColor: look.residualBand, pointStyle: 'rect', pointHoverRadius: 0, order: 5, certaBand: true }),
          line('', flat(-b), look.residualBand, { borderWidth: 0, pointHoverRadius: 0, order: 5, certaBand: true }),
          line('', flat(0), look.context, { borderWidth: 1, pointHoverRadius: 0, order: 4, certaBand: true }),
        ],
      },
      options: opts,
    });
  }
  document.documentElement.setAttribute('data-charts', 'drawn');
}

/** The report's inline script: the drawing function, called with the page data. */
export function reportScript(): string {
  if (script !== null) return script;
  // a transpiler that keeps function names (tsx, vitest) wraps them in a `__name` helper; the
  // shim makes the inlined source run wherever it was compiled
  script = `(function () { var __name = function (f) { return f; }; (${drawReport.toString()})(window.Chart, JSON.parse(document.getElementById('certa-data').textContent)); })();`;
  return script;
}

/** The text of `reportScript`, made once per process (one string, so its hash and check are found again at once). */
let script: string | null = null;
