import { ChangeDetectionStrategy, Component, DestroyRef, OnInit, computed, inject, output, viewChildren } from '@angular/core';
import { takeUntilDestroyed, toSignal } from '@angular/core/rxjs-interop';
import { NonNullableFormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonToggleModule } from '@angular/material/button-toggle';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatSelect, MatSelectModule } from '@angular/material/select';
import { COLOURS, Colour, ColourCodeError, DecodedBands, decodeBands, decodeBodyTipDot } from '@domain/colour-code';
import { map, startWith } from 'rxjs';
import { ohmsText } from '../calc-format';

export type MarkingMode = '4' | '5' | 'btd';

/** Paint for drawing each colour on the body: the colour of the paint, not a theme colour. */
export const PAINT: Readonly<Record<Colour, string>> = {
  black: '#1b1b1b',
  brown: '#7a4a22',
  red: '#d0312d',
  orange: '#f0801a',
  yellow: '#f6d21c',
  green: '#2e8b3e',
  blue: '#2a5fc9',
  violet: '#8a3fb6',
  grey: '#8c8c8c',
  white: '#f7f7f2',
  gold: '#c9a13b',
  silver: '#c4c8cc',
  pink: '#f29cb8',
  none: 'transparent',
};

const BAND_NAMES_4 = ['1st digit', '2nd digit', 'multiplier', 'tolerance'];
const BAND_NAMES_5 = ['1st digit', '2nd digit', '3rd digit', 'multiplier', 'tolerance'];

/** What was decoded, or why not (the colour-code module's own message). */
export type Decoded = { ok: true; value: DecodedBands } | { ok: false; message: string };

/**
 * Colour bands picked on a resistor body drawn in SVG (IEC 60062): 4 or 5 bands, or body–tip–dot
 * for old composition parts. Each band is a labelled select (the keyboard path); a click on a band
 * of the drawing opens that select. Emits the decoded value on opening and on every pick.
 */
@Component({
  selector: 'dm-colour-picker',
  imports: [ReactiveFormsModule, MatButtonToggleModule, MatFormFieldModule, MatSelectModule],
  templateUrl: './colour-picker.html',
  styleUrl: './colour-picker.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ColourPicker implements OnInit {
  private readonly destroyRef = inject(DestroyRef);
  private readonly fb = inject(NonNullableFormBuilder);
  readonly picked = output<DecodedBands>();

  protected readonly colours = COLOURS;
  protected readonly paint = PAINT;
  protected readonly form = this.fb.group({
    mode: this.fb.control<MarkingMode>('4'),
    four: this.fb.array<Colour>(['brown', 'black', 'yellow', 'silver']),
    five: this.fb.array<Colour>(['brown', 'black', 'black', 'orange', 'brown']),
    body: this.fb.control<Colour>('brown'),
    tip: this.fb.control<Colour | 'same'>('black'),
    dot: this.fb.control<Colour | 'same'>('yellow'),
    end: this.fb.control<Colour>('silver'),
  });
  private readonly selects = viewChildren(MatSelect);

  protected readonly value = toSignal(this.form.valueChanges.pipe(map(() => this.form.getRawValue())), { initialValue: this.form.getRawValue() });
  protected readonly mode = computed(() => this.value().mode);
  protected readonly bands = computed<Colour[]>(() => (this.value().mode === '5' ? this.value().five : this.value().four));
  protected readonly bandNames = computed(() => (this.mode() === '5' ? BAND_NAMES_5 : BAND_NAMES_4));
  protected readonly decoded = computed<Decoded>(() => decode(this.value()));
  protected readonly decodedText = computed(() => {
    const d = this.decoded();
    return d.ok ? `${ohmsText(d.value.ohms, 6)} ±${d.value.tolerancePct} %` : '';
  });
  /** The drawing in words, for its `<title>`. */
  protected readonly description = computed(() => {
    const v = this.value();
    if (v.mode === 'btd') {
      return `Composition resistor: ${v.body} body, ${v.tip === 'same' ? 'no tip colour' : v.tip + ' tip'}, ${v.dot === 'same' ? 'no dot' : v.dot + ' dot'}, ${v.end === 'none' ? 'unpainted' : v.end} end`;
    }
    return `Resistor with ${this.bands().length} bands: ${this.bands().map((b) => (b === 'none' ? 'no band' : b)).join(', ')}`;
  });
  /** Band positions along the body (x of each band's left edge, in the drawing's units). */
  protected readonly bandX = computed(() => (this.mode() === '5' ? [70, 96, 122, 148, 214] : [74, 104, 134, 214]));

  /** Emits what the bands read as soon as the picker opens, then on every pick. */
  ngOnInit(): void {
    this.form.valueChanges.pipe(startWith(null), takeUntilDestroyed(this.destroyRef)).subscribe(() => {
      const d = decode(this.form.getRawValue());
      if (d.ok) this.picked.emit(d.value);
    });
  }

  /** A click on a band of the drawing opens its select (the selects are the keyboard path). */
  protected openBand(index: number): void {
    const select = this.selects()[index];
    if (!select) return;
    select.focus();
    select.open();
  }

  protected colourOptions(position: 'digit' | 'multiplier' | 'tolerance'): readonly Colour[] {
    if (position === 'tolerance') return COLOURS;
    return COLOURS.filter((c) => c !== 'none' && (position === 'multiplier' || !['gold', 'silver', 'pink'].includes(c)));
  }

  protected positionOf(index: number): 'digit' | 'multiplier' | 'tolerance' {
    const n = this.bands().length;
    return index === n - 1 ? 'tolerance' : index === n - 2 ? 'multiplier' : 'digit';
  }

  protected fill(c: Colour | 'same'): string {
    const v = this.value();
    return c === 'same' ? PAINT[v.body] : PAINT[c];
  }
}

function decode(v: { mode: MarkingMode; four: Colour[]; five: Colour[]; body: Colour; tip: Colour | 'same'; dot: Colour | 'same'; end: Colour }): Decoded {
  try {
    if (v.mode === 'btd') {
      return { ok: true, value: decodeBodyTipDot({ body: v.body, tip: v.tip === 'same' ? null : v.tip, dot: v.dot === 'same' ? null : v.dot, end: v.end }) };
    }
    return { ok: true, value: decodeBands(v.mode === '5' ? v.five : v.four) };
  } catch (e) {
    if (e instanceof ColourCodeError) return { ok: false, message: e.message };
    throw e;
  }
}
