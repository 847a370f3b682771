import { timestamp } from 'drizzle-orm/pg-core';

/** Timestamp columns shared by the tables (spread into each table's columns). */
export const timestamps = {
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
};
