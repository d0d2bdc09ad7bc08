import { sql } from 'drizzle-orm'
import { index, integer, jsonb, pgEnum, pgTable, serial, text, timestamp, uniqueIndex } from 'drizzle-orm/pg-core'

export const userRole = pgEnum('user_role', ['collector', 'maker', 'shipper'])

export const users = pgTable('users', {
  id: serial('id').primaryKey(),
  email: text('email').notNull(),
  name: text('name').notNull(),
  passwordHash: text('password_hash').notNull(),
  role: userRole('role').notNull().default('collector'),
  // Bumped on password change or role change: sealed cookies carrying an older value stop working.
  sessionVersion: integer('session_version').notNull().default(1),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
}, table => [
  uniqueIndex('users_email_lower_unique').on(sql`lower(${table.email})`),
])

export const settings = pgTable('settings', {
  key: text('key').primaryKey(),
  value: jsonb('value').notNull(),
  updatedAt: timestamp('updated_at', { withTimezone: true }).notNull().defaultNow(),
  updatedBy: integer('updated_by').references(() => users.id, { onDelete: 'set null' }),
})

export const mailStatus = pgEnum('mail_status', ['pending', 'sending', 'sent', 'failed'])

export const mailOutbox = pgTable('mail_outbox', {
  id: serial('id').primaryKey(),
  // What caused the message, e.g. `welcome:12`; unique so a retried change cannot queue it twice.
  dedupeKey: text('dedupe_key').unique(),
  toAddress: text('to_address').notNull(),
  subject: text('subject').notNull(),
  textBody: text('text_body').notNull(),
  htmlBody: text('html_body').notNull(),
  status: mailStatus('status').notNull().default('pending'),
  attempts: integer('attempts').notNull().default(0),
  nextAttemptAt: timestamp('next_attempt_at', { withTimezone: true }).notNull().defaultNow(),
  lastError: text('last_error'),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
  sentAt: timestamp('sent_at', { withTimezone: true }),
}, table => [
  index('mail_outbox_due').on(table.status, table.nextAttemptAt),
])

export const signInFailures = pgTable('sign_in_failures', {
  id: serial('id').primaryKey(),
  email: text('email').notNull(),
  address: text('address').notNull(),
  at: timestamp('at', { withTimezone: true }).notNull().defaultNow(),
}, table => [
  index('sign_in_failures_email').on(table.email, table.at),
  index('sign_in_failures_address').on(table.address, table.at),
])

export const passwordResets = pgTable('password_resets', {
  tokenHash: text('token_hash').primaryKey(),
  userId: integer('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  expiresAt: timestamp('expires_at', { withTimezone: true }).notNull(),
  usedAt: timestamp('used_at', { withTimezone: true }),
  createdAt: timestamp('created_at', { withTimezone: true }).notNull().defaultNow(),
})
