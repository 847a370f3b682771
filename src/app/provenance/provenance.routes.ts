import { Routes } from '@angular/router';

/** `/provenance/...` (filled in by the bench-survey work). */
export default [] satisfies Routes;
