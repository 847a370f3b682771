import { closeApiEnv } from './api-env';

// One environment per run of the API suite, closed when the suite ends.
afterAll(async () => {
  await closeApiEnv();
});

// bcrypt and PostgreSQL round trips: allow more than jasmine's 5 s default per spec.
jasmine.DEFAULT_TIMEOUT_INTERVAL = 30_000;
