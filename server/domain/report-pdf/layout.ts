import type PDFDocument from 'pdfkit';
import { drawLine, wrapSegments, type Line, type Segment, type TextStyle } from './text';

type Doc = InstanceType<typeof PDFDocument>;

/** A4 portrait in PDF points. */
export const PAGE = {
  width: 595.28,
  height: 841.89,
  marginX: 42,
  /** Where content starts on pages after the first (below the running header). */
  contentTop: 58,
  /** Content never goes below this; the footer lives underneath. */
  contentBottom: 841.89 - 62,
} as const;

export const CONTENT_WIDTH = PAGE.width - 2 * PAGE.marginX;

/** Cristae's report palette: ink on white, one blue-green accent, warm and red tints for notices. */
export const COLORS = {
  ink: '#1c262b',
  muted: '#56646b',
  accent: '#285a63',
  accentLight: '#87b0b3',
  band: '#edf3f3',
  zebra: '#f5f8f8',
  rule: '#c6d1d3',
  below: '#8a2c1f',
  above: '#6a4a00',
  correctedInk: '#6b3d00',
  correctedFill: '#fbf2e3',
  correctedStripe: '#b06d12',
  rejectedInk: '#7a1f1f',
  rejectedFill: '#f9eceb',
  rejectedStripe: '#a33a3a',
  majorShade: '#ecd8d3',
  minorShade: '#f5ebe4',
} as const;

const style = (weight: 400 | 600, size: number, color: string = COLORS.ink): TextStyle => ({ weight, size, color });

export const STYLES = {
  body: style(400, 9),
  bodyStrong: style(600, 9),
  small: style(400, 7.5, COLORS.muted),
  smallStrong: style(600, 7.5, COLORS.ink),
  label: style(400, 7.5, COLORS.muted),
  value: style(400, 8.8),
  valueStrong: style(600, 8.8),
  heading: style(600, 10.5, COLORS.accent),
  tableHead: style(600, 7.3, COLORS.accent),
  cell: style(400, 8.2),
  cellStrong: style(600, 8.2),
  footer: style(400, 7, COLORS.muted),
  footerStrong: style(600, 7, COLORS.ink),
} as const;

export function lineHeightOf(s: TextStyle): number {
  return s.size * 1.38;
}

/** Distance from the top of a line box to its baseline. */
export function ascentOf(s: TextStyle): number {
  return s.size * 1.02;
}

export interface Block {
  lines: Line[];
  lineHeight: number;
  ascent: number;
  height: number;
}

/**
 * Keeps the vertical position and breaks pages where the layout asks. Every element measures itself
 * first and calls `ensure(height)`, so nothing is ever cut by the page edge.
 */
export class Composer {
  y: number;

  constructor(
    readonly doc: Doc,
    private readonly onNewPage: (c: Composer) => void,
    startY: number,
  ) {
    this.y = startY;
  }

  get left(): number {
    return PAGE.marginX;
  }

  get width(): number {
    return CONTENT_WIDTH;
  }

  /** Starts a new page when `height` does not fit below the current position. */
  ensure(height: number): void {
    if (this.y + height > PAGE.contentBottom) this.newPage();
  }

  newPage(): void {
    this.doc.addPage({ size: 'A4', margin: 0 });
    this.y = PAGE.contentTop;
    this.onNewPage(this);
  }

  space(points: number): void {
    this.y += points;
  }

  measure(content: string | Segment[], s: TextStyle, width: number): Block {
    const segments = typeof content === 'string' ? [{ text: content, style: s }] : content;
    const lines = wrapSegments(this.doc, segments, width);
    const lineHeight = lineHeightOf(s);
    return { lines, lineHeight, ascent: ascentOf(s), height: lines.length * lineHeight };
  }

  /** One line only; longer text is cut at a word and ends with an ellipsis. */
  singleLine(text: string, s: TextStyle, width: number): Block {
    let block = this.measure(text, s, width);
    const words = text.split(/\s+/);
    while (block.lines.length > 1 && words.length > 1) {
      words.pop();
      block = this.measure(`${words.join(' ')}\u2026`, s, width);
    }
    return { ...block, lines: block.lines.slice(0, 1), height: block.lineHeight };
  }

  /** Draws a measured block with its top at `top`, without moving the cursor. */
  drawBlock(
    block: Block,
    x: number,
    top: number,
    align: 'left' | 'right' | 'center' = 'left',
    boxWidth = 0,
  ): void {
    block.lines.forEach((line, i) => {
      drawLine(this.doc, line, x, top + i * block.lineHeight + block.ascent, align, boxWidth);
    });
  }

  /** Flowing text that may continue on the next page, line by line. */
  paragraph(content: string | Segment[], s: TextStyle, opts: { x?: number; width?: number } = {}): void {
    const x = opts.x ?? this.left;
    const width = opts.width ?? this.width;
    const block = this.measure(content, s, width);
    for (const line of block.lines) {
      this.ensure(block.lineHeight);
      // A blank line (paragraph break) that lands at the top of a new page is dropped.
      if (line.runs.length === 0 && this.y === PAGE.contentTop) continue;
      drawLine(this.doc, line, x, this.y + block.ascent);
      this.y += block.lineHeight;
    }
  }

  /** A section title with a hairline; kept on the same page as `keepWith` points of what follows. */
  heading(title: string, keepWith = 40): void {
    const block = this.measure(title, STYLES.heading, this.width);
    this.ensure(block.height + 6 + keepWith);
    this.drawBlock(block, this.left, this.y);
    this.y += block.height + 1;
    this.hairline(this.y, COLORS.rule);
    this.y += 5;
  }

  hairline(y: number, color: string, x1 = this.left, x2 = this.left + this.width): void {
    this.doc.save().moveTo(x1, y).lineTo(x2, y).lineWidth(0.6).strokeColor(color).stroke().restore();
  }

  rect(x: number, y: number, w: number, h: number, fill: string): void {
    this.doc.save().rect(x, y, w, h).fillColor(fill).fill().restore();
  }
}
