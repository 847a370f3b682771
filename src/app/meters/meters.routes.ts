import { Routes } from '@angular/router';

/** `/meters/...` (filled in by the bench-survey work). */
export default [] satisfies Routes;
