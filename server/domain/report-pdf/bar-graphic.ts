import type { ReportGraphic } from '@/schemas/report-document';
import { formatPercent } from './format';
import { COLORS, Composer, STYLES } from './layout';

/**
 * Horizontal bars, two per complex (ratio to CS, ratio to CII), each as % of the reference mean of
 * that ratio. Bars are named in words beside them, so the figure reads the same printed in grey.
 */

const SERIES = [
  { key: 'pctOfMeanRatioCs', short: 'to CS', legend: 'Ratio to citrate synthase (CS)', color: COLORS.accent },
  { key: 'pctOfMeanRatioCii', short: 'to CII', legend: 'Ratio to complex II (CII)', color: COLORS.accentLight },
] as const;

const BAR_HEIGHT = 7.5;
const BAR_GAP = 2;
const ROW_GAP = 9;
const LABEL_WIDTH = 74;
const VALUE_ROOM = 58;
const MIN_SCALE = 150;
const MAX_SCALE = 300;

/** Axis end: at least 150%, rounded up to the next 50%, at most 300% (longer bars are cut). */
export function axisMaximum(graphic: ReportGraphic): number {
  const values = graphic.bars.flatMap((b) => [b.pctOfMeanRatioCs, b.pctOfMeanRatioCii]);
  const max = Math.max(MIN_SCALE, ...values.filter((v): v is number => v !== null));
  return Math.min(MAX_SCALE, Math.ceil(max / 50) * 50);
}

export function drawBarGraphic(c: Composer, graphic: ReportGraphic, title = 'Activity as % of reference mean'): void {
  if (graphic.bars.length === 0) return;
  const bands = graphic.criterionBands;
  const axisMax = axisMaximum(graphic);
  const plotX = c.left + LABEL_WIDTH;
  const plotW = c.width - LABEL_WIDTH - VALUE_ROOM;
  const xOf = (pct: number): number => plotX + (Math.min(pct, axisMax) / axisMax) * plotW;
  const rowHeight = SERIES.length * BAR_HEIGHT + (SERIES.length - 1) * BAR_GAP + ROW_GAP;
  const plotHeight = graphic.bars.length * rowHeight + 4;

  const legendSegments: Array<{ color: string; text: string }> = SERIES.map((s) => ({
    color: s.color,
    text: s.legend,
  }));
  if (bands) {
    legendSegments.push(
      { color: COLORS.majorShade, text: `Major-criterion band (below ${bands.majorBelowPct}%)` },
      { color: COLORS.minorShade, text: `Minor-criterion band (${bands.majorBelowPct}\u2013${bands.minorBelowPct}%)` },
    );
  }
  const caption = c.measure(
    'Each bar is the complex\u2019s activity ratio as a percentage of the reference mean of that ratio; ' +
      'the line marks 100%.' +
      (bands ? ` Shading shows the criterion bands of ${bands.ruleSetLabel}.` : '') +
      (graphic.bars.some((b) => (b.pctOfMeanRatioCs ?? 0) > axisMax || (b.pctOfMeanRatioCii ?? 0) > axisMax)
        ? ` Bars beyond ${axisMax}% are cut at the edge and labelled with their value.`
        : ''),
    STYLES.small,
    c.width,
  );
  const legendLine = 12;
  const legendRows = Math.ceil(legendSegments.length / 2);
  const axisLabels = 13;
  const total = legendRows * legendLine + 6 + plotHeight + axisLabels + caption.height + 4;

  c.heading(title, total);
  const doc = c.doc;

  // Legend, two entries a row.
  legendSegments.forEach((entry, i) => {
    const col = i % 2;
    const row = Math.floor(i / 2);
    const x = c.left + col * (c.width / 2);
    const y = c.y + row * legendLine;
    c.rect(x, y + 1.5, 14, 7, entry.color);
    c.drawBlock(c.singleLine(entry.text, STYLES.small, c.width / 2 - 20), x + 18, y);
  });
  c.y += legendRows * legendLine + 6;

  const top = c.y;
  // Criterion shading under everything else.
  if (bands) {
    c.rect(plotX, top, xOf(bands.majorBelowPct) - plotX, plotHeight, COLORS.majorShade);
    const majorX = xOf(bands.majorBelowPct);
    c.rect(majorX, top, xOf(bands.minorBelowPct) - majorX, plotHeight, COLORS.minorShade);
  }
  // Grid every 50%, axis labels below.
  for (let pct = 0; pct <= axisMax; pct += 50) {
    const x = xOf(pct);
    if (pct !== 100) {
      doc.save().moveTo(x, top).lineTo(x, top + plotHeight).lineWidth(0.4).strokeColor(COLORS.rule).stroke().restore();
    }
    const label = c.measure(`${pct}%`, STYLES.small, 40);
    c.drawBlock(label, x - 20, top + plotHeight + 2, 'center', 40);
  }

  const labels: Array<{ text: string; x: number; y: number }> = [];
  graphic.bars.forEach((bar, i) => {
    const rowTop = top + 4 + i * rowHeight;
    const code = c.measure(bar.assay, STYLES.smallStrong, 34);
    const barsHeight = rowHeight - ROW_GAP;
    c.drawBlock(code, c.left, rowTop + (barsHeight - code.height) / 2);
    SERIES.forEach((series, si) => {
      const y = rowTop + si * (BAR_HEIGHT + BAR_GAP);
      const name = c.measure(series.short, { ...STYLES.small, size: 6.8 }, 36);
      c.drawBlock({ ...name, ascent: BAR_HEIGHT - 1 }, plotX - 40, y, 'right', 36);
      const value = bar[series.key];
      if (value === null) {
        // On a white patch, as the value labels: grey text on the criterion shading fell below 4.5:1 contrast.
        const none = c.measure('not available', { ...STYLES.small, size: 6.8 }, 60);
        c.rect(plotX + 1.5, y - 0.5, (none.lines[0]?.width ?? 0) + 3, BAR_HEIGHT + 1, '#ffffff');
        c.drawBlock({ ...none, ascent: BAR_HEIGHT - 1 }, plotX + 3, y);
        return;
      }
      const end = xOf(value);
      c.rect(plotX, y, Math.max(0.8, end - plotX), BAR_HEIGHT, series.color);
      if (value > axisMax) {
        // A white notch near the end marks a cut bar.
        doc.save().moveTo(end - 9, y + BAR_HEIGHT + 1).lineTo(end - 5, y - 1);
        doc.lineWidth(1.6).strokeColor('#ffffff').stroke().restore();
      }
      labels.push({ text: formatPercent(value, bands ? { below: [bands.majorBelowPct, bands.minorBelowPct] } : {}), x: end + 3, y });
    });
  });

  // The 100% line goes over the bars so none hides it.
  const x100 = xOf(100);
  doc
    .save()
    .moveTo(x100, top - 2)
    .lineTo(x100, top + plotHeight)
    .lineWidth(1)
    .dash(2.5, { space: 1.5 })
    .strokeColor(COLORS.ink)
    .stroke()
    .undash()
    .restore();
  // Value labels last, on a white patch, so neither the 100% line nor the shading crosses them.
  const labelStyle = { ...STYLES.smallStrong, size: 7 };
  for (const l of labels) {
    const block = c.measure(l.text, labelStyle, VALUE_ROOM);
    const w = block.lines[0]?.width ?? 0;
    c.rect(l.x - 1.5, l.y - 0.5, w + 3, BAR_HEIGHT + 1, '#ffffff');
    c.drawBlock({ ...block, ascent: BAR_HEIGHT - 0.8 }, l.x, l.y);
  }
  c.hairline(top + plotHeight, COLORS.muted, plotX, plotX + plotW);

  c.y = top + plotHeight + axisLabels;
  c.drawBlock(caption, c.left, c.y);
  c.y += caption.height + 14;
}
