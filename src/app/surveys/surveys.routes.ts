import { Routes } from '@angular/router';

/** `/surveys/...` (filled in by the bench-survey work). */
export default [] satisfies Routes;
