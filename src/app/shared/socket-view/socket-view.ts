import { ChangeDetectionStrategy, Component, computed, input, output } from '@angular/core';
import { baseGeometry, pinXY, type BaseGeometry } from '@domain/base-geometry';
import type { TubePin } from '@domain/template-format';
import { VERDICT_LABELS, type Verdict } from '@domain/words';

/**
 * One text glyph per verdict, each a different shape, shown with the word (never colour alone,
 * WCAG 2.2, 1.4.1). Text glyphs, since an icon font does not sit well inside SVG text.
 */
export const SOCKET_MARK_GLYPHS: Readonly<Record<Verdict, string>> = {
  'in-band': '✓',
  'near-limit': '◐',
  high: '↑',
  low: '↓',
  open: '∅',
  short: '⚡',
  inconclusive: '?',
  'not-read': '–',
};

/** Drawing units: the pin circle's radius and the label ring's radius. */
const PIN_RING = 52;
const LABEL_RING = 74;
/** The drawing's box: wide enough for two lines of LABEL_LINE characters beside the ring on either side. */
export const SOCKET_VIEWBOX = { x: -195, y: -130, width: 390, height: 260 } as const;
/** Characters per label line (11-unit type: about 6 units a character, 195 − 74 units to the edge). */
export const LABEL_LINE = 19;
/** Drawing units between the lines of a label. */
const LINE_STEP = 12;

/**
 * A pin label in at most `maxLines` lines of at most `width` characters, broken between words;
 * a word longer than a line is cut, and what does not fit ends the last line with "…" (the
 * drawing keeps the full words in the pin's aria-label and its `<title>`).
 */
export function wrapLabel(text: string, width = LABEL_LINE, maxLines = 2): { lines: string[]; shortened: boolean } {
  const lines: string[] = [];
  let line = '';
  for (const word of text.trim().split(/\s+/).filter(Boolean)) {
    const candidate = line ? `${line} ${word}` : word;
    if (candidate.length <= width) {
      line = candidate;
      continue;
    }
    if (line) lines.push(line);
    line = word;
    while (line.length > width) {
      lines.push(line.slice(0, width));
      line = line.slice(width);
    }
  }
  if (line) lines.push(line);
  if (lines.length <= maxLines) return { lines, shortened: false };
  const kept = lines.slice(0, maxLines);
  const last = kept[maxLines - 1];
  kept[maxLines - 1] = `${last.length >= width ? last.slice(0, width - 1) : last}…`;
  return { lines: kept, shortened: true };
}
/** Drawing radius of a pin: 7 units for the base's thinnest pin, larger pins in proportion (heavy heater pins). */
const pinRadius = (g: BaseGeometry, diameterMm: number): number => (7 * diameterMm) / Math.min(...g.pins.map((p) => p.diameterMm));

interface DrawnPin {
  pin: number;
  tubePin: TubePin | null;
  x: number;
  y: number;
  r: number;
  heavy: boolean;
  labelX: number;
  labelY: number;
  anchor: 'start' | 'middle' | 'end';
  text: string;
  /** The label as drawn, in lines. */
  lines: string[];
  /** The drawn label leaves words out (the title and aria-label keep them). */
  shortened: boolean;
  /** The first line's offset from labelY, so the block sits on its side of the ring. */
  firstDy: number;
  tag: 'NC' | 'IC' | null;
  mark: Verdict | null;
  markText: string | null;
  ariaLabel: string;
}

/** A tube socket drawn as a bottom view from the base-geometry table. */
@Component({
  selector: 'dm-socket-view',
  templateUrl: './socket-view.html',
  styleUrl: './socket-view.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SocketView {
  /** Base name (a key of the base-geometry table). */
  readonly base = input.required<string>();
  /** The tube type's pins. */
  readonly pins = input.required<readonly TubePin[]>();
  /** Optional verdict per pin number. */
  readonly marks = input<Readonly<Record<number, Verdict>>>({});
  readonly pinSelected = output<TubePin>();

  protected readonly viewBox = `${SOCKET_VIEWBOX.x} ${SOCKET_VIEWBOX.y} ${SOCKET_VIEWBOX.width} ${SOCKET_VIEWBOX.height}`;
  protected readonly lineStep = LINE_STEP;
  protected readonly geometry = computed(() => baseGeometry(this.base()) ?? null);

  protected readonly drawn = computed<DrawnPin[]>(() => {
    const g = this.geometry();
    if (g === null) return [];
    const marks = this.marks();
    return g.pins.map((p) => {
      const tubePin = this.pins().find((t) => t.pin === p.pin) ?? null;
      const at = pinXY(p.angleDeg, PIN_RING);
      const lab = pinXY(p.angleDeg, LABEL_RING);
      const anchor = lab.x > 8 ? 'start' : lab.x < -8 ? 'end' : 'middle';
      const tag = tubePin?.electrode === 'NC' ? 'NC' : tubePin?.electrode === 'IC' ? 'IC' : null;
      const words = tubePin === null ? 'not listed' : tag === 'IC' ? 'IC, internally connected, not a tie point' : tag === 'NC' ? 'NC, no connection' : tubePin.label;
      const mark = marks[p.pin] ?? null;
      const markText = mark === null ? null : `${SOCKET_MARK_GLYPHS[mark]} ${VERDICT_LABELS[mark]}`;
      const text = tag ?? tubePin?.label ?? '—';
      const { lines, shortened } = wrapLabel(text);
      // Above the ring the block grows upward, beside it it stays centred, below it grows downward.
      const firstDy = lab.y < -8 ? -(lines.length - 1) * LINE_STEP : lab.y > 8 ? 0 : -((lines.length - 1) * LINE_STEP) / 2;
      return {
        pin: p.pin,
        tubePin,
        x: at.x,
        y: at.y,
        r: pinRadius(g, p.diameterMm),
        heavy: p.heavy,
        labelX: lab.x,
        labelY: lab.y + (lab.y > 8 ? 6 : lab.y < -8 ? -2 : 3),
        anchor,
        text,
        lines,
        shortened,
        firstDy,
        tag,
        mark,
        markText,
        ariaLabel: `pin ${p.pin}, ${words}${mark === null ? '' : `, ${VERDICT_LABELS[mark]}`}`,
      };
    });
  });

  /** Where the gap, key or heavy-pin reference is drawn. */
  protected readonly reference = computed(() => {
    const g = this.geometry();
    if (g === null) return null;
    const tip = pinXY(g.referenceAngleDeg, PIN_RING + 18);
    return { kind: g.reference, x: tip.x, y: tip.y, angle: g.referenceAngleDeg };
  });

  protected select(d: DrawnPin, event?: Event): void {
    event?.preventDefault();
    if (d.tubePin !== null) this.pinSelected.emit(d.tubePin);
  }
}
