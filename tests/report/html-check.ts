/**
 * A small, strict reader of the report's HTML for tests: the doctype, every tag opened and closed in
 * order (HTML void elements and self-closed SVG elements allowed), and the elements with their attributes.
 * Not a general HTML parser: the report is generated and holds no comments, scripts or CDATA.
 */
import { expect } from 'vitest';
export interface Element {
  readonly name: string;
  readonly attributes: Readonly<Record<string, string>>;
  /** Names of the open elements around this one, outermost first. */
  readonly ancestors: readonly string[];
}

export interface CheckedHtml {
  readonly doctype: boolean;
  readonly elements: readonly Element[];
  readonly problems: readonly string[];
}

const VOID = new Set(['area', 'base', 'br', 'col', 'embed', 'hr', 'img', 'input', 'link', 'meta', 'source', 'track', 'wbr']);
/** Elements whose content is raw text (no tags inside). */
const RAW_TEXT = new Set(['style', 'script', 'title']);

function parseAttributes(text: string, problems: string[], where: string): Record<string, string> {
  const attributes: Record<string, string> = {};
  const body = text.replace(/\/\s*$/, '');
  const re = /\s*([^\s=/>]+)(?:\s*=\s*(?:"([^"]*)"|'([^']*)'|([^\s"'=<>`]+)))?/y;
  let at = 0;
  while (body.slice(at).trim() !== '') {
    re.lastIndex = at;
    const m = re.exec(body);
    if (m === null) {
      problems.push(`${where}: cannot read attributes "${body.slice(at, at + 40)}"`);
      break;
    }
    const name = (m[1] as string).toLowerCase();
    if (Object.hasOwn(attributes, name)) problems.push(`${where}: attribute ${name} given twice`);
    attributes[name] = m[2] ?? m[3] ?? m[4] ?? '';
    at = re.lastIndex;
  }
  return attributes;
}

export function checkHtml(html: string): CheckedHtml {
  const problems: string[] = [];
  const elements: Element[] = [];
  const doctype = /^<!DOCTYPE html>/i.test(html);
  const stack: string[] = [];
  const tag = /<(\/?)([A-Za-z][A-Za-z0-9:-]*)((?:[^>"']|"[^"]*"|'[^']*')*)>/g;
  let i = doctype ? html.indexOf('>') + 1 : 0;
  tag.lastIndex = i;
  let m: RegExpExecArray | null;
  while ((m = tag.exec(html)) !== null) {
    const between = html.slice(i, m.index);
    if (between.includes('<') && !RAW_TEXT.has(stack.at(-1) ?? '')) problems.push(`stray "<" before offset ${m.index}`);
    i = tag.lastIndex;
    const closing = m[1] === '/';
    const name = (m[2] as string).toLowerCase();
    const rest = m[3] as string;
    const where = `<${closing ? '/' : ''}${name}> at offset ${m.index}`;
    if (closing) {
      const open = stack.pop();
      if (open !== name) problems.push(`${where} closes <${open ?? 'nothing'}>`);
      continue;
    }
    elements.push({ name, attributes: parseAttributes(rest, problems, where), ancestors: [...stack] });
    const selfClosed = /\/\s*$/.test(rest);
    if (VOID.has(name) || selfClosed) continue;
    stack.push(name);
    if (RAW_TEXT.has(name)) {
      const end = html.toLowerCase().indexOf(`</${name}>`, i);
      if (end < 0) problems.push(`${where} is never closed`);
      else {
        i = end;
        tag.lastIndex = end;
      }
    }
  }
  if (stack.length > 0) problems.push(`left open at the end: ${stack.join(' > ')}`);
  return { doctype, elements, problems };
}

/** Checks that the page is a whole HTML document: doctype first, every tag closed in order, a language and a character set. */
export function expectWholeDocument(checked: CheckedHtml): void {
  expect(checked.doctype).toBe(true);
  expect(checked.problems).toEqual([]);
  expect(checked.elements[0]).toMatchObject({ name: 'html', attributes: { lang: 'en' } });
  expect(checked.elements.some((e) => e.name === 'meta' && e.attributes.charset === 'utf-8')).toBe(true);
}

/**
 * Checks that the page fetches nothing: no element that loads something (script, style sheet, image, frame,
 * media), no src, no URL in an attribute, every link one that `links` accepts, and no URL or import in the
 * page's text (`text`: the page, less what the caller allows in it).
 */
export function expectFetchesNothing(checked: CheckedHtml, text: string, links: RegExp): void {
  for (const e of checked.elements) {
    expect(['script', 'link', 'img', 'iframe', 'object', 'embed', 'image', 'use', 'video', 'audio', 'source']).not.toContain(e.name);
    for (const [name, value] of Object.entries(e.attributes)) {
      if (name === 'href' || name === 'xlink:href') expect(value).toMatch(links);
      expect(name).not.toBe('src');
      expect(value).not.toMatch(/url\(|^[a-z][a-z0-9+.-]*:\/\//i);
    }
  }
  expect(text).not.toMatch(/@import|url\(|https?:\/\//i);
}
