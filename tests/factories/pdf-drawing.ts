import { OPS } from 'pdfjs-dist/legacy/build/pdf.mjs';
import { openPdf } from './pdf-text';

/**
 * Reads what a PDF page paints, with pdfjs-dist's operator list (an independent PDF reader): filled and stroked
 * paths with their colour and bounding box, and text runs with their colour, size and baseline, all in page
 * coordinates (points, origin at the bottom left, as ISO 32000-1 §8.3.2.3 defines default user space). The
 * graphics state is followed as §8.4 describes: `cm` multiplies the CTM, `q`/`Q` save and restore it with the
 * colours, line width and dash (only what the checks need).
 */

type Matrix = [number, number, number, number, number, number];

export interface Shape {
  kind: 'fill' | 'stroke';
  color: string;
  x1: number;
  y1: number;
  x2: number;
  y2: number;
  lineWidth: number;
  dashed: boolean;
  /** Position in the page's painting order. */
  order: number;
}

export interface TextRun {
  text: string;
  x: number;
  y: number;
  size: number;
  color: string;
  /** The font's PostScript name as embedded (subset tag, then family and style, e.g. "…+IBMPlexSans-SemiBold"). */
  font: string;
  order: number;
}

export interface DrawnPage {
  shapes: Shape[];
  texts: TextRun[];
}

const IDENTITY: Matrix = [1, 0, 0, 1, 0, 0];

/** m applied first, then n (ISO 32000-1 §8.3.4: CTM' = M × CTM). */
function times(m: Matrix, n: Matrix): Matrix {
  return [
    m[0] * n[0] + m[1] * n[2],
    m[0] * n[1] + m[1] * n[3],
    m[2] * n[0] + m[3] * n[2],
    m[2] * n[1] + m[3] * n[3],
    m[4] * n[0] + m[5] * n[2] + n[4],
    m[4] * n[1] + m[5] * n[3] + n[5],
  ];
}

const apply = (m: Matrix, x: number, y: number): [number, number] => [m[0] * x + m[2] * y + m[4], m[1] * x + m[3] * y + m[5]];

interface State {
  ctm: Matrix;
  fill: string;
  stroke: string;
  lineWidth: number;
  dashed: boolean;
}

/** Points of a pdfjs path (moveTo 0, lineTo 1, curveTo 2, quadraticCurveTo 3, closePath 4). */
function pathPoints(data: ArrayLike<number>): Array<[number, number]> {
  const points: Array<[number, number]> = [];
  const arity: Record<number, number> = { 0: 2, 1: 2, 2: 6, 3: 4, 4: 0 };
  for (let i = 0; i < data.length; ) {
    const op = data[i]!;
    const n = arity[op];
    if (n === undefined) throw new Error(`Unknown path operation ${op}`);
    for (let k = 0; k < n; k += 2) points.push([data[i + 1 + k]!, data[i + 2 + k]!]);
    i += 1 + n;
  }
  return points;
}

export async function readDrawing(bytes: Buffer): Promise<DrawnPage[]> {
  const pdf = await openPdf(bytes);
  const pages: DrawnPage[] = [];
  for (let n = 1; n <= pdf.numPages; n++) {
    const page = await pdf.getPage(n);
    const list = await page.getOperatorList();
    const shapes: Shape[] = [];
    const texts: TextRun[] = [];
    let state: State = { ctm: IDENTITY, fill: '#000000', stroke: '#000000', lineWidth: 1, dashed: false };
    const stack: State[] = [];
    let tm: Matrix = IDENTITY;
    let fontSize = 0;
    let fontName = '';
    let order = 0;
    list.fnArray.forEach((fn, i) => {
      const args = list.argsArray[i] as unknown[];
      switch (fn) {
        case OPS.save:
          stack.push({ ...state });
          break;
        case OPS.restore:
          state = stack.pop() ?? state;
          break;
        case OPS.transform:
          state.ctm = times(args as Matrix, state.ctm);
          break;
        case OPS.setFillRGBColor:
          state.fill = String(args[0]);
          break;
        case OPS.setStrokeRGBColor:
          state.stroke = String(args[0]);
          break;
        case OPS.setLineWidth:
          state.lineWidth = Number(args[0]);
          break;
        case OPS.setDash:
          state.dashed = (args[0] as number[]).length > 0;
          break;
        case OPS.constructPath: {
          const paint = args[0] as number;
          const data = (args[1] as Array<ArrayLike<number>>)[0] ?? [];
          const points = pathPoints(data).map(([x, y]) => apply(state.ctm, x, y));
          if (points.length === 0) break;
          const xs = points.map((p) => p[0]);
          const ys = points.map((p) => p[1]);
          const box = { x1: Math.min(...xs), y1: Math.min(...ys), x2: Math.max(...xs), y2: Math.max(...ys) };
          const common = { ...box, lineWidth: state.lineWidth, dashed: state.dashed };
          if ([OPS.fill, OPS.eoFill, OPS.fillStroke, OPS.eoFillStroke].includes(paint)) {
            shapes.push({ kind: 'fill', color: state.fill, ...common, order: order++ });
          }
          if ([OPS.stroke, OPS.closeStroke, OPS.fillStroke, OPS.eoFillStroke].includes(paint)) {
            shapes.push({ kind: 'stroke', color: state.stroke, ...common, order: order++ });
          }
          break;
        }
        case OPS.beginText:
          tm = IDENTITY;
          break;
        case OPS.setTextMatrix:
          tm = Array.from(args[0] as ArrayLike<number>) as Matrix;
          break;
        case OPS.setFont: {
          fontSize = Number(args[1]);
          const id = String(args[0]);
          fontName = page.commonObjs.has(id) ? String((page.commonObjs.get(id) as { name?: string }).name ?? id) : id;
          break;
        }
        case OPS.showText: {
          const glyphs = args[0] as Array<{ unicode?: string } | number>;
          const text = glyphs.map((g) => (typeof g === 'number' ? '' : (g.unicode ?? ''))).join('');
          const m = times(tm, state.ctm);
          const [x, y] = apply(m, 0, 0);
          texts.push({ text, x, y, size: fontSize * Math.hypot(m[2], m[3]), color: state.fill, font: fontName, order: order++ });
          break;
        }
        default:
          break;
      }
    });
    pages.push({ shapes, texts });
  }
  await pdf.destroy();
  return pages;
}
