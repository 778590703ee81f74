import { sql } from 'drizzle-orm'
import {
  bigint, boolean, char, datetime, double, index, int, json, mysqlEnum, mysqlTable, timestamp, uniqueIndex, varchar,
} from 'drizzle-orm/mysql-core'
import { ROLES } from '../../shared/utils/roles'
import { FRAME_FORMATS, FRAME_STATUSES } from '../../shared/utils/uploads'
import { DECISIONS } from '../../shared/utils/decisions'
import type { DeliverySpec } from '../../shared/engine/specs'
import type { FrameImageKind } from '../../shared/utils/frame-images'
import type { AnalysisJson, HistogramsJson } from '../../shared/utils/report'
import type { PackedLevels } from '../../shared/engine/pack'
import type { LineupAnalysisJson } from '../../shared/utils/lineup'
import type { SheetSummary } from '../lib/sheet-rules'
import { FRAME_RATE_NAMES, type FrameRateName } from '../../shared/utils/timecode'
import { CLIP_STATUSES } from '../../shared/utils/clips'

// MariaDB rejects drizzle's serial(); every key is an unsigned auto-increment bigint.
const id = () => bigint('id', { mode: 'number', unsigned: true }).autoincrement().primaryKey()
const ref = (name: string) => bigint(name, { mode: 'number', unsigned: true })
const timestamps = {
  createdAt: timestamp('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
  updatedAt: timestamp('updated_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`).onUpdateNow(),
}

export const users = mysqlTable('users', {
  id: id(),
  email: varchar('email', { length: 254 }).notNull(),
  name: varchar('name', { length: 120 }).notNull(),
  passwordHash: varchar('password_hash', { length: 255 }).notNull(),
  ...timestamps,
}, (t) => [uniqueIndex('users_email_uq').on(t.email)])

export const teams = mysqlTable('teams', {
  id: id(),
  name: varchar('name', { length: 120 }).notNull(),
  ...timestamps,
})

export const memberships = mysqlTable('memberships', {
  id: id(),
  teamId: ref('team_id').notNull().references(() => teams.id, { onDelete: 'cascade' }),
  userId: ref('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  role: mysqlEnum('role', ROLES).notNull(),
  ...timestamps,
}, (t) => [uniqueIndex('memberships_team_user_uq').on(t.teamId, t.userId), index('memberships_user_idx').on(t.userId)])

export const invitations = mysqlTable('invitations', {
  id: id(),
  teamId: ref('team_id').notNull().references(() => teams.id, { onDelete: 'cascade' }),
  email: varchar('email', { length: 254 }).notNull(),
  role: mysqlEnum('role', ROLES).notNull(),
  // Only the SHA-256 of the token is stored: a leaked table cannot be used to join a team.
  tokenHash: char('token_hash', { length: 64 }).notNull(),
  invitedBy: ref('invited_by').references(() => users.id, { onDelete: 'set null' }),
  expiresAt: datetime('expires_at', { mode: 'date' }).notNull(),
  acceptedAt: datetime('accepted_at', { mode: 'date' }),
  revokedAt: datetime('revoked_at', { mode: 'date' }),
  ...timestamps,
}, (t) => [uniqueIndex('invitations_token_uq').on(t.tokenHash), index('invitations_team_idx').on(t.teamId)])

export const passwordResets = mysqlTable('password_resets', {
  id: id(),
  userId: ref('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  tokenHash: char('token_hash', { length: 64 }).notNull(),
  expiresAt: datetime('expires_at', { mode: 'date' }).notNull(),
  usedAt: datetime('used_at', { mode: 'date' }),
  ...timestamps,
}, (t) => [uniqueIndex('password_resets_token_uq').on(t.tokenHash)])

export const deliverySpecs = mysqlTable('delivery_specs', {
  id: id(),
  teamId: ref('team_id').notNull().references(() => teams.id, { onDelete: 'cascade' }),
  // The built-in spec this one was copied from, if any (e.g. "ntsc-setup").
  builtin: varchar('builtin', { length: 64 }),
  name: varchar('name', { length: 120 }).notNull(),
  version: int('version').notNull().default(1),
  body: json('body').$type<DeliverySpec>().notNull(),
  ...timestamps,
}, (t) => [index('delivery_specs_team_idx').on(t.teamId)])

export const productions = mysqlTable('productions', {
  id: id(),
  teamId: ref('team_id').notNull().references(() => teams.id, { onDelete: 'cascade' }),
  name: varchar('name', { length: 160 }).notNull(),
  client: varchar('client', { length: 160 }).notNull().default(''),
  deliverySpecId: ref('delivery_spec_id').references(() => deliverySpecs.id, { onDelete: 'set null' }),
  createdBy: ref('created_by').references(() => users.id, { onDelete: 'set null' }),
  archived: boolean('archived').notNull().default(false),
  ...timestamps,
}, (t) => [index('productions_team_idx').on(t.teamId)])

export const reels = mysqlTable('reels', {
  id: id(),
  teamId: ref('team_id').notNull().references(() => teams.id, { onDelete: 'cascade' }),
  productionId: ref('production_id').notNull().references(() => productions.id, { onDelete: 'cascade' }),
  name: varchar('name', { length: 160 }).notNull(),
  sourceLabel: varchar('source_label', { length: 120 }).notNull().default(''),
  sourceRange: mysqlEnum('source_range', ['full', 'studio']).notNull().default('full'),
  matrix: mysqlEnum('matrix', ['601', '709']).notNull().default('601'),
  /** The frame rate the reel's timecodes count in (null: not given; timecodes are shown as read). */
  frameRate: mysqlEnum('frame_rate', FRAME_RATE_NAMES as [FrameRateName, ...FrameRateName[]]),
  /** Drop-frame labels (29.97 and 59.94 only). */
  dropFrame: boolean('drop_frame').notNull().default(false),
  /** Next frame index; taken under a row lock so concurrent uploads get distinct indexes. */
  nextSeq: int('next_seq').notNull().default(1),
  /** Sign-off: who and when; while set, the reel is read-only until an owner reopens it. */
  signedAt: datetime('signed_at', { mode: 'date', fsp: 3 }),
  signedBy: ref('signed_by').references(() => users.id, { onDelete: 'set null' }),
  createdBy: ref('created_by').references(() => users.id, { onDelete: 'set null' }),
  ...timestamps,
}, (t) => [index('reels_production_idx').on(t.productionId), index('reels_team_idx').on(t.teamId)])

export const auditLog = mysqlTable('audit_log', {
  id: id(),
  teamId: ref('team_id').references(() => teams.id, { onDelete: 'cascade' }),
  actorId: ref('actor_id').references(() => users.id, { onDelete: 'set null' }),
  action: varchar('action', { length: 64 }).notNull(),
  subjectType: varchar('subject_type', { length: 32 }).notNull(),
  subjectId: ref('subject_id'),
  details: json('details'),
  createdAt: timestamp('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
}, (t) => [index('audit_team_idx').on(t.teamId, t.createdAt)])

/** A file announced by the browser and given a presigned URL; becomes a frame once confirmed. */
export const uploads = mysqlTable('uploads', {
  id: id(),
  teamId: ref('team_id').notNull().references(() => teams.id, { onDelete: 'cascade' }),
  reelId: ref('reel_id').notNull().references(() => reels.id, { onDelete: 'cascade' }),
  userId: ref('user_id').references(() => users.id, { onDelete: 'set null' }),
  objectKey: varchar('object_key', { length: 255 }).notNull(),
  name: varchar('name', { length: 255 }).notNull(),
  bytes: bigint('bytes', { mode: 'number', unsigned: true }).notNull(),
  format: mysqlEnum('format', FRAME_FORMATS).notNull(),
  rawWidth: int('raw_width'),
  rawHeight: int('raw_height'),
  multipartId: varchar('multipart_id', { length: 255 }),
  expiresAt: datetime('expires_at', { mode: 'date' }).notNull(),
  completedAt: datetime('completed_at', { mode: 'date' }),
  /** Set while one request checks the stored file, so parallel completions wait for it instead of racing. */
  claimedAt: datetime('claimed_at', { mode: 'date', fsp: 3 }),
  /** The frame this upload became (the same answer for every later completion of it). */
  frameId: ref('frame_id'),
  ...timestamps,
}, (t) => [index('uploads_reel_idx').on(t.reelId)])

export const frames = mysqlTable('frames', {
  id: id(),
  teamId: ref('team_id').notNull().references(() => teams.id, { onDelete: 'cascade' }),
  reelId: ref('reel_id').notNull().references(() => reels.id, { onDelete: 'cascade' }),
  /** Order within the reel (upload order), shown as the frame's index. */
  seq: int('seq').notNull(),
  name: varchar('name', { length: 255 }).notNull(),
  timecode: varchar('timecode', { length: 16 }),
  objectKey: varchar('object_key', { length: 255 }).notNull(),
  sha256: char('sha256', { length: 64 }).notNull(),
  bytes: bigint('bytes', { mode: 'number', unsigned: true }).notNull(),
  format: mysqlEnum('format', FRAME_FORMATS).notNull(),
  width: int('width').notNull(),
  height: int('height').notNull(),
  status: mysqlEnum('status', FRAME_STATUSES).notNull().default('queued'),
  failReason: varchar('fail_reason', { length: 500 }),
  /** When the frame was last handed to the queue; the sweeper re-queues stale `queued` rows. */
  queuedAt: datetime('queued_at', { mode: 'date', fsp: 3 }),
  uploadedBy: ref('uploaded_by').references(() => users.id, { onDelete: 'set null' }),
  ...timestamps,
}, (t) => [
  uniqueIndex('frames_reel_sha_uq').on(t.reelId, t.sha256),
  uniqueIndex('frames_reel_seq_uq').on(t.reelId, t.seq),
  index('frames_status_idx').on(t.status, t.queuedAt),
  // An object is deleted only when no frame points at it: that check is one indexed lookup.
  index('frames_object_key_idx').on(t.objectKey),
])

/** One analysis per frame (the unique key makes a second run of the same job a no-op). */
export const analyses = mysqlTable('analyses', {
  id: id(),
  frameId: ref('frame_id').notNull().references(() => frames.id, { onDelete: 'cascade' }),
  teamId: ref('team_id').notNull().references(() => teams.id, { onDelete: 'cascade' }),
  engineVersion: varchar('engine_version', { length: 32 }).notNull(),
  specName: varchar('spec_name', { length: 64 }).notNull(),
  specVersion: int('spec_version').notNull(),
  verdict: mysqlEnum('verdict', ['pass', 'caution', 'fail']).notNull(),
  // Key figures as columns so that the frames table can sort and filter in SQL.
  lumaMinIre: double('luma_min_ire').notNull(),
  lumaMaxIre: double('luma_max_ire').notNull(),
  lumaMeanIre: double('luma_mean_ire').notNull(),
  compMinIre: double('comp_min_ire').notNull(),
  compMaxIre: double('comp_max_ire').notNull(),
  outShare: double('out_share').notNull(),
  /** The reel settings this analysis was measured with; a job finding others measures again. Null: from before they were kept. */
  matrix: mysqlEnum('matrix', ['601', '709']),
  sourceRange: mysqlEnum('source_range', ['full', 'studio']),
  /** The engine's JSON result (same field names as `npm run analyse -- --json`), without pixel data. */
  /** The analysis JSON; analyses stored before engine 1.2.0 have no line-up objects. */
  result: json('result').$type<AnalysisJson & Partial<Pick<LineupAnalysisJson, 'bars' | 'blanking' | 'match'>>>().notNull(),
  histograms: json('histograms').$type<HistogramsJson>().notNull(),
  /** The images stored for the frame (served as /api/frames/:id/images/:kind). */
  /** Packed level distributions (shared/engine/pack.ts): a changed spec is judged again from these. Null before they were kept. */
  levels: json('levels').$type<PackedLevels>(),
  images: json('images').$type<FrameImageKind[]>().notNull(),
  durationMs: int('duration_ms').notNull(),
  ...timestamps,
}, (t) => [uniqueIndex('analyses_frame_uq').on(t.frameId), index('analyses_team_idx').on(t.teamId)])


/** A reviewer's decision on a frame; one current decision per frame, every change in the audit log. */
export const decisions = mysqlTable('decisions', {
  id: id(),
  frameId: ref('frame_id').notNull().references(() => frames.id, { onDelete: 'cascade' }),
  teamId: ref('team_id').notNull().references(() => teams.id, { onDelete: 'cascade' }),
  decision: mysqlEnum('decision', DECISIONS).notNull(),
  note: varchar('note', { length: 1000 }).notNull().default(''),
  decidedBy: ref('decided_by').references(() => users.id, { onDelete: 'set null' }),
  /** Set when a re-judge changed the frame's verdict after this decision: kept, but to be looked at again. */
  recheckAt: datetime('recheck_at', { mode: 'date', fsp: 3 }),
  recheckNote: varchar('recheck_note', { length: 300 }),
  ...timestamps,
}, (t) => [uniqueIndex('decisions_frame_uq').on(t.frameId), index('decisions_team_idx').on(t.teamId)])

export const SHEET_STATUSES = ['pending', 'ready', 'failed'] as const

/**
 * One sign-off of a reel. The spec is copied as it was at that moment (a later edit of the
 * team's spec must not rewrite what was signed), with the engine version that measured it.
 * Reopening marks the row superseded; its sheet stays stored for the record.
 */
export const signoffs = mysqlTable('signoffs', {
  id: id(),
  teamId: ref('team_id').notNull().references(() => teams.id, { onDelete: 'cascade' }),
  reelId: ref('reel_id').notNull().references(() => reels.id, { onDelete: 'cascade' }),
  signedBy: ref('signed_by').references(() => users.id, { onDelete: 'set null' }),
  /** The signer's name as it was, so the record survives a rename or a removed account. */
  signerName: varchar('signer_name', { length: 120 }).notNull(),
  signedAt: datetime('signed_at', { mode: 'date', fsp: 3 }).notNull(),
  specName: varchar('spec_name', { length: 64 }).notNull(),
  specTitle: varchar('spec_title', { length: 120 }).notNull(),
  specVersion: int('spec_version').notNull(),
  specBody: json('spec_body').$type<DeliverySpec>().notNull(),
  engineVersion: varchar('engine_version', { length: 32 }).notNull(),
  sheetStatus: mysqlEnum('sheet_status', SHEET_STATUSES).notNull().default('pending'),
  sheetError: varchar('sheet_error', { length: 500 }),
  pdfKey: varchar('pdf_key', { length: 255 }),
  csvKey: varchar('csv_key', { length: 255 }),
  /** The summary as printed on the sheet (counts and overall result). */
  summary: json('summary').$type<SheetSummary>(),
  supersededAt: datetime('superseded_at', { mode: 'date', fsp: 3 }),
  supersededBy: ref('superseded_by').references(() => users.id, { onDelete: 'set null' }),
  reopenReason: varchar('reopen_reason', { length: 1000 }),
  ...timestamps,
}, (t) => [index('signoffs_reel_idx').on(t.reelId, t.signedAt), index('signoffs_team_idx').on(t.teamId)])

/**
 * One row per signed-in browser. The sealed cookie carries a random id whose SHA-256 is
 * looked up here on every request, so sign-out, a password reset or "sign out everywhere"
 * ends a session at once instead of when its cookie expires.
 */
export const sessions = mysqlTable('sessions', {
  id: id(),
  userId: ref('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  tokenHash: char('token_hash', { length: 64 }).notNull(),
  userAgent: varchar('user_agent', { length: 255 }).notNull().default(''),
  expiresAt: datetime('expires_at', { mode: 'date' }).notNull(),
  revokedAt: datetime('revoked_at', { mode: 'date', fsp: 3 }),
  ...timestamps,
}, (t) => [uniqueIndex('sessions_token_uq').on(t.tokenHash), index('sessions_user_idx').on(t.userId, t.revokedAt)])

/**
 * A personal API token for scripts: scoped to one team, with a role no wider than its
 * maker's. Only the SHA-256 of the token is stored; the token itself is shown once.
 */
export const apiTokens = mysqlTable('api_tokens', {
  id: id(),
  teamId: ref('team_id').notNull().references(() => teams.id, { onDelete: 'cascade' }),
  userId: ref('user_id').notNull().references(() => users.id, { onDelete: 'cascade' }),
  name: varchar('name', { length: 80 }).notNull(),
  role: mysqlEnum('role', ROLES).notNull(),
  tokenHash: char('token_hash', { length: 64 }).notNull(),
  expiresAt: datetime('expires_at', { mode: 'date' }),
  lastUsedAt: datetime('last_used_at', { mode: 'date' }),
  revokedAt: datetime('revoked_at', { mode: 'date', fsp: 3 }),
  ...timestamps,
}, (t) => [uniqueIndex('api_tokens_token_uq').on(t.tokenHash), index('api_tokens_team_user_idx').on(t.teamId, t.userId)])

/**
 * Every saved version of a team's delivery spec, as it was; delivery_specs holds the current one.
 * Analyses and sign-offs name the version they were judged against.
 */
export const deliverySpecVersions = mysqlTable('delivery_spec_versions', {
  id: id(),
  teamId: ref('team_id').notNull().references(() => teams.id, { onDelete: 'cascade' }),
  specId: ref('spec_id').notNull().references(() => deliverySpecs.id, { onDelete: 'cascade' }),
  version: int('version').notNull(),
  body: json('body').$type<DeliverySpec>().notNull(),
  /** What changed from the previous version, in words (shared/utils/specs.ts describeSpecChanges). */
  changes: json('changes').$type<string[]>().notNull(),
  /** What re-judging changed when this version was applied: counts by transition. */
  rejudge: json('rejudge').$type<{ judged: number, changed: number, text: string, skippedSigned: number }>(),
  createdBy: ref('created_by').references(() => users.id, { onDelete: 'set null' }),
  createdAt: timestamp('created_at', { mode: 'date', fsp: 3 }).notNull().default(sql`CURRENT_TIMESTAMP(3)`),
}, (t) => [uniqueIndex('delivery_spec_versions_uq').on(t.specId, t.version), index('delivery_spec_versions_team_idx').on(t.teamId)])

/**
 * The production's reference source for matching: one bars frame the other sources' bars are
 * compared with (level offset, gain ratio, chroma gain, hue offset). One per production.
 */
export const barsReferences = mysqlTable('bars_references', {
  id: id(),
  teamId: ref('team_id').notNull().references(() => teams.id, { onDelete: 'cascade' }),
  productionId: ref('production_id').notNull().references(() => productions.id, { onDelete: 'cascade' }),
  frameId: ref('frame_id').notNull().references(() => frames.id, { onDelete: 'cascade' }),
  setBy: ref('set_by').references(() => users.id, { onDelete: 'set null' }),
  ...timestamps,
}, (t) => [uniqueIndex('bars_references_production_uq').on(t.productionId), index('bars_references_frame_idx').on(t.frameId)])

/**
 * An uploaded video file. Every frame is measured into a timeline (one binary object in S3,
 * `timelineKey`) and the runs beyond the spec become `clip_events`; the kept frames (worst
 * of each event, filmstrip, asked for) are ordinary frames of the reel (`clip_frames`).
 */
export const clips = mysqlTable('clips', {
  id: id(),
  teamId: ref('team_id').notNull().references(() => teams.id, { onDelete: 'cascade' }),
  reelId: ref('reel_id').notNull().references(() => reels.id, { onDelete: 'cascade' }),
  name: varchar('name', { length: 255 }).notNull(),
  objectKey: varchar('object_key', { length: 255 }).notNull(),
  bytes: bigint('bytes', { mode: 'number', unsigned: true }).notNull(),
  /** While the browser sends parts: the S3 multipart id and when the part URLs run out. */
  multipartId: varchar('multipart_id', { length: 255 }),
  uploadExpiresAt: datetime('upload_expires_at', { mode: 'date' }),
  status: mysqlEnum('status', CLIP_STATUSES).notNull().default('uploading'),
  failReason: varchar('fail_reason', { length: 500 }),
  /** What ffprobe found (ClipProbe in server/lib/clips/probe.ts). */
  probe: json('probe'),
  width: int('width'),
  height: int('height'),
  fpsNum: int('fps_num'),
  fpsDen: int('fps_den'),
  dropFrame: boolean('drop_frame').notNull().default(false),
  /** The label of frame 0; `startTimecodeFound` false when the file carries none (00:00:00:00 assumed). */
  startTimecode: varchar('start_timecode', { length: 16 }),
  startTimecodeFound: boolean('start_timecode_found').notNull().default(false),
  /** Frames the probe expects, and frames actually measured (fewer when the file breaks off). */
  frameCount: int('frame_count'),
  framesMeasured: int('frames_measured'),
  truncated: boolean('truncated').notNull().default(false),
  note: varchar('note', { length: 500 }),
  timelineKey: varchar('timeline_key', { length: 255 }),
  specName: varchar('spec_name', { length: 64 }),
  specVersion: int('spec_version'),
  engineVersion: varchar('engine_version', { length: 32 }),
  measureStartedAt: datetime('measure_started_at', { mode: 'date', fsp: 3 }),
  measuredAt: datetime('measured_at', { mode: 'date', fsp: 3 }),
  /** Outbox for the probe job, as frames.queued_at is for analysis. */
  queuedAt: datetime('queued_at', { mode: 'date', fsp: 3 }),
  uploadedBy: ref('uploaded_by').references(() => users.id, { onDelete: 'set null' }),
  ...timestamps,
}, (t) => [index('clips_reel_idx').on(t.reelId), index('clips_team_idx').on(t.teamId), index('clips_status_idx').on(t.status, t.queuedAt)])

/** One time chunk of a clip, measured by any worker; its part of the timeline is in S3 once `measured` is set. */
export const clipChunks = mysqlTable('clip_chunks', {
  id: id(),
  clipId: ref('clip_id').notNull().references(() => clips.id, { onDelete: 'cascade' }),
  teamId: ref('team_id').notNull().references(() => teams.id, { onDelete: 'cascade' }),
  idx: int('idx').notNull(),
  startFrame: int('start_frame').notNull(),
  frameCount: int('frame_count').notNull(),
  framesDone: int('frames_done').notNull().default(0),
  /** Frames the chunk measured (null until it finished); fewer than frame_count where the file broke off. */
  measured: int('measured'),
  error: varchar('error', { length: 500 }),
  ...timestamps,
}, (t) => [uniqueIndex('clip_chunks_clip_idx_uq').on(t.clipId, t.idx)])

/** A run of a clip's frames beyond the spec; decided through its worst frame (`frame_id`). */
export const clipEvents = mysqlTable('clip_events', {
  id: id(),
  clipId: ref('clip_id').notNull().references(() => clips.id, { onDelete: 'cascade' }),
  teamId: ref('team_id').notNull().references(() => teams.id, { onDelete: 'cascade' }),
  seq: int('seq').notNull(),
  startFrame: int('start_frame').notNull(),
  endFrame: int('end_frame').notNull(),
  tcIn: varchar('tc_in', { length: 16 }).notNull(),
  tcOut: varchar('tc_out', { length: 16 }).notNull(),
  verdict: mysqlEnum('verdict', ['caution', 'fail']).notNull(),
  /** LimitWorst[] (shared/utils/clip-timeline.ts). */
  limits: json('limits').notNull(),
  worstFrame: int('worst_frame').notNull(),
  frameId: ref('frame_id').references(() => frames.id, { onDelete: 'set null' }),
  ...timestamps,
}, (t) => [uniqueIndex('clip_events_clip_seq_uq').on(t.clipId, t.seq), index('clip_events_frame_idx').on(t.frameId)])

export const CLIP_FRAME_KINDS = ['event', 'filmstrip', 'asked'] as const

/** A frame of a clip kept as a frame of the reel (full scopes, decisions, sheet). */
export const clipFrames = mysqlTable('clip_frames', {
  id: id(),
  clipId: ref('clip_id').notNull().references(() => clips.id, { onDelete: 'cascade' }),
  teamId: ref('team_id').notNull().references(() => teams.id, { onDelete: 'cascade' }),
  frameNumber: int('frame_number').notNull(),
  frameId: ref('frame_id').notNull().references(() => frames.id, { onDelete: 'cascade' }),
  kind: mysqlEnum('kind', CLIP_FRAME_KINDS).notNull(),
  ...timestamps,
}, (t) => [uniqueIndex('clip_frames_clip_frame_uq').on(t.clipId, t.frameNumber), index('clip_frames_frame_idx').on(t.frameId)])
