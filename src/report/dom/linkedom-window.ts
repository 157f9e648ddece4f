/**
 * The document d3-node draws in. d3-node makes its document with
 * `new JSDOM()`; every build of gapstack (the command-line bundle, the library
 * bundle, the test runner) resolves d3-node's `jsdom` to this module
 * (scripts/report-dom.mjs), so the charts are built in a linkedom window: the
 * same DOM calls, about a third of the report's time less than a full browser
 * emulation (its load alone was 300 ms), and one serialisation everywhere.
 */
import { parseHTML } from 'linkedom';

const EMPTY_PAGE = '<!DOCTYPE html><html><head></head><body></body></html>';

/** What d3-node uses of jsdom's JSDOM: a window, made from a page, and the page as text. */
export class JSDOM {
  readonly window: Window;

  constructor(html: string = EMPTY_PAGE) {
    this.window = parseHTML(html).window as unknown as Window;
  }

  serialize(): string {
    return this.window.document.documentElement.outerHTML;
  }
}
