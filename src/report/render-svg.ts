/**
 * A vega-lite spec → an SVG string, rendered headless in Node (vega's 'none' renderer: no canvas, no
 * browser, no network). The SVG is made ready to inline in HTML: no XML namespace attributes, a role and
 * a label for screen readers.
 */
import { parse, View, Warn, type Config, type LoggerInterface } from 'vega';
import { compile, type TopLevelSpec } from 'vega-lite';

/** Look shared by every plot of the report. */
export const PLOT_CONFIG = {
  font: 'system-ui, -apple-system, "Segoe UI", Roboto, Helvetica, Arial, sans-serif',
  background: '#ffffff',
  view: { stroke: '#d6d9de' },
  axis: { labelColor: '#3b3f45', titleColor: '#23262b', gridColor: '#eceef1', domainColor: '#9aa0a8', tickColor: '#9aa0a8', labelFontSize: 10, titleFontSize: 11 },
  legend: { labelFontSize: 10, titleFontSize: 11 },
  title: { fontSize: 12, anchor: 'start', color: '#23262b' },
} as const;

function escapeAttribute(text: string): string {
  return text.replaceAll('&', '&amp;').replaceAll('"', '&quot;').replaceAll('<', '&lt;');
}

/** A logger that keeps the plotting libraries' warnings (never printed: they go where the caller says). */
function collectingLogger(warnings: string[]): LoggerInterface {
  let level = Warn;
  const text = (args: unknown[]): string => args.map((a) => (a instanceof Error ? a.message : String(a))).join(' ');
  const logger: LoggerInterface = {
    level(value?: number) {
      if (value === undefined) return level;
      level = value;
      return logger;
    },
    error(...args: unknown[]) {
      warnings.push(text(args));
      return logger;
    },
    warn(...args: unknown[]) {
      warnings.push(text(args));
      return logger;
    },
    info() {
      return logger;
    },
    debug() {
      return logger;
    },
  };
  return logger;
}

/**
 * Renders a spec to SVG; `label` describes the plot for people who cannot see it. The libraries' warnings
 * (a spec that asks for something they had to change) are added to `warnings`, never printed. `vegaConfig`
 * adds vega's own settings to the compiled spec (those vega-lite's config does not carry).
 */
export async function renderSvg(spec: TopLevelSpec, label: string, warnings: string[] = [], vegaConfig: Config = {}): Promise<string> {
  const logger = collectingLogger(warnings);
  const compiled = compile({ config: PLOT_CONFIG, ...spec } as TopLevelSpec, { logger }).spec;
  const vegaSpec = { ...compiled, config: { ...compiled.config, ...vegaConfig, legend: { ...compiled.config?.legend, ...vegaConfig.legend } } };
  const view = new View(parse(vegaSpec), { renderer: 'none', logger, logLevel: Warn });
  try {
    const svg = await view.toSVG();
    return svg.replace(/^<svg([^>]*)>/, (_match, attributes: string) => {
      const kept = attributes.replace(/\s+xmlns(:xlink)?="[^"]*"/g, '');
      return `<svg${kept} role="img" aria-label="${escapeAttribute(label)}">`;
    });
  } finally {
    view.finalize();
  }
}

/** An SVG from renderSvg as a file of its own (a download): the XML prolog and the SVG namespace back in place. */
export function svgDocument(inlineSvg: string): string {
  return `<?xml version="1.0" encoding="utf-8"?>\n${inlineSvg.replace(/^<svg/, '<svg xmlns="http://www.w3.org/2000/svg"')}\n`;
}
