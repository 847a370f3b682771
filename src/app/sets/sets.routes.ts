import { Routes } from '@angular/router';

/** `/sets/...` (filled in by the bench-survey work). */
export default [] satisfies Routes;
