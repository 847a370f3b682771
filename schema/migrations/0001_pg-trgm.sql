-- Trigram matching for the template library's search (maker, model, chassis number, tube types):
-- pg_trgm ships with Debian's postgresql package (contrib).
CREATE EXTENSION IF NOT EXISTS pg_trgm;
