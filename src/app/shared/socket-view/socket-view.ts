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
