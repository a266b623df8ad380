/**
 * One figure of the study report as HTML: drawn at a few widths (the page shows the widest that fits
 * the figure's column, so tick labels keep their size in pixels and the plot takes the page's width), its
 * caption, and a link that saves it as an SVG file (a data URL: nothing is fetched).
 */
import type { TopLevelSpec } from 'vega-lite';
import { escapeHtml } from './html-page.ts';
import { renderSvg, svgDocument } from './render-svg.ts';
import { STUDY_VEGA_CONFIG } from './study-plot-specs.ts';

/**
 * The widths (px, the whole SVG) every study figure is drawn at, narrowest first: each at most a quarter
 * wider than the one before, so a drawing is never shown more than 1.25 times its size below the widest.
 */
export const FIGURE_WIDTHS_PX = [480, 600, 720, 900, 1140] as const;

/** The drawing a figure's link saves: about a journal page's full text width. */
export const SAVED_WIDTH_PX = 720;

export interface StudyFigure {
  /** The figure's number on the page (Figure N). */
  readonly number: number;
  /** What kind of plot it is (`data-plot`), also the saved file's name. */
  readonly kind: string;
  /** What the plot shows, for people who cannot see it. */
  readonly label: string;
  /** The caption, plain text. */
  readonly caption: string;
  readonly spec: (widthPx: number) => TopLevelSpec;
}

/** The CSS that shows each figure's drawing for its column's width (container queries). */
export function figureWidthStyle(): string {
  const rules = ['figure.study { container-type: inline-size; }', 'figure.study .render { display: none; }', 'figure.study .render.w0 { display: block; }'];
  FIGURE_WIDTHS_PX.forEach((width, i) => {
    if (i === 0) return;
    rules.push(`@container (min-width: ${width}px) { figure.study .render.w${i - 1} { display: none; } figure.study .render.w${i} { display: block; } }`);
  });
  return rules.join('\n');
}

function sizeOf(svg: string): { readonly width: number; readonly height: number } {
  const width = /^<svg[^>]*\swidth="([\d.]+)"/.exec(svg)?.[1];
  const height = /^<svg[^>]*\sheight="([\d.]+)"/.exec(svg)?.[1];
  return { width: Number(width ?? 0), height: Number(height ?? 0) };
}

/** The file name a figure is saved under. */
export function figureFileName(f: Pick<StudyFigure, 'number' | 'kind'>): string {
  return `figure-${f.number}-${f.kind.replace(/[^A-Za-z0-9_-]+/g, '-')}.svg`;
}

export async function figureHtml(f: StudyFigure, warnings: string[]): Promise<string> {
  const renders: string[] = [];
  let saved = '';
  for (const [i, width] of FIGURE_WIDTHS_PX.entries()) {
    const svg = await renderSvg(f.spec(width), f.label, warnings, STUDY_VEGA_CONFIG);
    const size = sizeOf(svg);
    renders.push(`<div class="render w${i}" style="min-width:${size.width}px">${svg}</div>`);
    if (width === SAVED_WIDTH_PX) {
      const href = `data:image/svg+xml;base64,${Buffer.from(svgDocument(svg), 'utf8').toString('base64')}`;
      saved = `<p class="save"><a download="${figureFileName(f)}" href="${href}">Save Figure ${f.number} as SVG</a> (${size.width} × ${size.height} px)</p>`;
    }
  }
  return [
    `<figure class="study" id="figure-${f.number}" data-plot="${escapeHtml(f.kind)}">`,
    `<div class="renders">${renders.join('')}</div>`,
    `<figcaption><strong>Figure ${f.number}.</strong> ${escapeHtml(f.caption)}</figcaption>`,
    saved,
    '</figure>',
  ].join('\n');
}
