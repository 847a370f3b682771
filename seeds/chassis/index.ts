/**
 * The three invented demo chassis templates (fictional makers and models), as template documents
 * (format driftmark-template v1).
 */
import type { TemplateDocument } from '../../api/domain/template-format';
import { kestrel5 } from './kestrel-5';
import { larkspur7p } from './larkspur-7p';
import { quenbyQa10 } from './quenby-qa10';

export { KESTREL_5_LINE_VOLTS, kestrel5 } from './kestrel-5';
export { LARKSPUR_HV_RMS, larkspur7p } from './larkspur-7p';
export { QUENBY_HV_RMS, quenbyQa10 } from './quenby-qa10';

/** Fresh copies of the demo chassis documents: (a) AC/DC table set, (b) console, (c) amplifier. */
export function demoChassis(): TemplateDocument[] {
  return [kestrel5(), larkspur7p(), quenbyQa10()];
}
