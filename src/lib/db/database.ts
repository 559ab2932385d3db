import type { ColumnType, Generated, Insertable, Selectable, Updateable } from 'kysely';

/** Timestamps come back as Date and may be written as Date or ISO text. */
type Timestamp = ColumnType<Date, Date | string | undefined, Date | string>;
type TimestampNullable = ColumnType<Date | null, Date | string | null | undefined, Date | string | null>;
/** `date` columns come back as 'YYYY-MM-DD' text (see the type parser in db.ts). */
type DateText = ColumnType<string, string, string>;
type Json<T> = ColumnType<T, string | T | undefined, string | T>;

import type { Role } from '../auth/types';
import type { IntervalCallKind, Level } from '../levels';
import type { Cooling, Meter } from '../machines/machines';
import type { SampleState } from '../samples/samples';

// The domain words are defined in their feature modules; re-exported here for the row types' users.
export type { Cooling, IntervalCallKind, Level, Meter, Role, SampleState };

export interface UsersTable {
  id: string;
  email: string;
  email_verified_at: TimestampNullable;
  password_hash: string;
  display_name: string;
  distance_unit: Generated<'mi' | 'km'>;
  length_unit: Generated<'in' | 'mm'>;
  temperature_unit: Generated<'F' | 'C'>;
  /** IANA zone name the user reads times in; null until a browser or the account page sets it. */
  time_zone: string | null;
  created_at: Generated<Date>;
}

export interface CrewsTable {
  id: Generated<string>;
  name: string;
  created_at: Generated<Date>;
}

export interface CrewMembersTable {
  crew_id: string;
  user_id: string;
  role: Role;
  joined_at: Generated<Date>;
}

export interface SessionsTable {
  id: string;
  user_id: string;
  expires_at: Timestamp;
  current_crew_id: string | null;
}

export interface RecommendedGrade {
  grade: string;
  minC: number;
  maxC: number;
}

export interface MachinesTable {
  id: Generated<string>;
  crew_id: string;
  owner_user_id: string;
  name: string;
  model_year: number | null;
  engine_layout: 'single' | 'twin' | 'triple' | 'four' | 'other';
  displacement_cc: number | null;
  cooling: Cooling;
  shared_oil: Generated<boolean>;
  oil_capacity_l: number | null;
  meter: Meter;
  recommended_grades: Json<RecommendedGrade[]>;
  max_interval_distance: number | null;
  max_interval_days: number | null;
  notes: Generated<string>;
  /** The analysis engine version that judged this machine's stored findings; null or older: recompute. */
  judged_by: ColumnType<string | null, string | null | undefined, string | null>;
  archived_at: TimestampNullable;
  created_at: Generated<Date>;
  updated_at: Generated<Date>;
}

export interface OilChangesTable {
  id: Generated<string>;
  crew_id: string;
  machine_id: string;
  changed_on: DateText;
  odometer: number;
  meter_replaced: Generated<boolean>;
  oil_product: Generated<string>;
  sae_grade: string;
  volume_l: number | null;
  filter_changed: Generated<boolean>;
  top_up_l: Generated<number>;
  other_work: Json<string[]>;
  notes: Generated<string>;
  created_by: string;
  created_at: Generated<Date>;
  /** The device's key for an oil change sent from its offline queue (unique per crew); migration 2026_12_02_1700. */
  client_key: Generated<string | null>;
}

export interface PhotosTable {
  id: Generated<string>;
  crew_id: string;
  oil_change_id: string | null;
  sha256: string;
  content_type: string;
  byte_size: number;
  width: number | null;
  height: number | null;
  caption: Generated<string>;
  created_by: string;
  created_at: Generated<Date>;
}

export interface SamplesTable {
  id: Generated<string>;
  crew_id: string;
  machine_id: string;
  oil_change_id: string | null;
  bottle_code: string;
  bottle_code_norm: string;
  issued_code: Generated<boolean>;
  drawn_on: DateText;
  odometer: number;
  distance_on_oil: number | null;
  top_up_l: Generated<number>;
  sae_grade: string | null;
  oil_product: Generated<string>;
  draw_method: Generated<'midstream' | 'pump' | 'valve'>;
  state: Generated<SampleState>;
  tracking_note: Generated<string>;
  in_baseline: Generated<boolean>;
  /** Why a lead or mechanic took the sample out of the baseline (or put it back). */
  baseline_note: Generated<string>;
  /** The first oil of a new or rebuilt engine: judged, but never a baseline. */
  break_in: Generated<boolean>;
  baseline_changed_by: ColumnType<string | null, string | null | undefined, string | null>;
  baseline_changed_at: TimestampNullable;
  client_key: string | null;
  created_by: string;
  created_at: Generated<Date>;
}

export interface SampleEventsTable {
  id: Generated<string>;
  sample_id: string;
  state: SampleState;
  note: Generated<string>;
  actor_user_id: string | null;
  at: Generated<Date>;
}

export interface WearPartsTable {
  id: Generated<string>;
  crew_id: string;
  machine_id: string;
  name: string;
  piece_count: Generated<number>;
  new_min_mm: number;
  new_max_mm: number;
  service_limit_mm: number;
  limit_direction: Generated<'min' | 'max'>;
  notes: Generated<string>;
  created_at: Generated<Date>;
  /** Odometer (stored unit) when the part was fitted new; migration 2026_12_02_0400. */
  fitted_odometer: Generated<number>;
  /** The unit the service manual gives the part's figures in. */
  manual_unit: Generated<'in' | 'mm'>;
}

export interface WearMeasurementsTable {
  id: Generated<string>;
  wear_part_id: string;
  measured_on: DateText;
  odometer: number;
  pieces_mm: Json<number[]>;
  summary_mm: number;
  note: Generated<string>;
  created_by: string;
  created_at: Generated<Date>;
  /** The device's key for a measurement sent from its offline queue (unique per part); migration 2026_12_02_1700. */
  client_key: Generated<string | null>;
}

/** Sumpwise bottle codes reserved ahead of time for one device of one rider in one crew. */
export interface BottleCodeReservationsTable {
  code_norm: string;
  crew_id: string;
  user_id: string;
  device_key: string;
  reserved_at: Generated<Date>;
}

export interface LabFilesTable {
  id: Generated<string>;
  crew_id: string;
  sha256: string;
  file_name: string;
  byte_size: number;
  content: Buffer;
  /** Null for a file that arrived by mail (see inbound_mail_id). */
  uploaded_by: string | null;
  uploaded_at: Generated<Date>;
  inbound_mail_id: Generated<string | null>;
}

export interface LabProfilesTable {
  id: Generated<string>;
  crew_id: string;
  name: string;
  header_signature: string;
  mapping: Json<Record<string, string>>;
  /** The workbook sheet to read, for a profile saved from a spreadsheet. */
  sheet_name: Generated<string | null>;
  created_by: string;
  created_at: Generated<Date>;
}

export interface LabImportsTable {
  id: Generated<string>;
  crew_id: string;
  lab_file_id: string;
  confirmed_by: string;
  confirmed_at: Generated<Date>;
  samples_written: number;
  readings_written: number;
}

export interface ReadingsTable {
  sample_id: string;
  measurand: string;
  value: number;
  qualifier: '<' | '>' | null;
  lab_import_id: string | null;
}

export interface ReadingHistoryTable {
  id: Generated<string>;
  sample_id: string;
  measurand: string;
  value: number;
  qualifier: string | null;
  replaced_by_import: string | null;
  replaced_at: Generated<Date>;
}

export interface FindingsTable {
  id: Generated<string>;
  sample_id: string;
  measurand: string | null;
  level: Level;
  rule_id: string;
  numbers: Json<Record<string, unknown>>;
  sentence: string;
  created_at: Generated<Date>;
}

export interface IntervalCallsTable {
  id: Generated<string>;
  sample_id: string;
  machine_id: string;
  call: IntervalCallKind;
  next_interval: number | null;
  next_sample_odometer: number | null;
  next_sample_on: string | null;
  reasons: Json<string[]>;
  source: 'engine' | 'confirmed' | 'override';
  note: Generated<string>;
  made_by: string | null;
  created_at: Generated<Date>;
}

export interface ReviewNotesTable {
  id: Generated<string>;
  sample_id: string;
  author_user_id: string;
  body: string;
  created_at: Generated<Date>;
}

export interface CrewLimitsTable {
  crew_id: string;
  measurand: string;
  watch_at: number | null;
  act_at: number | null;
  updated_by: string | null;
  updated_at: Generated<Date>;
}

export type AuthTokenPurpose = 'verify_email' | 'reset_password';

/** Single-use tokens for e-mail verification and password reset; only the SHA-256 of the token is kept. */
export interface AuthTokensTable {
  id: Generated<string>;
  user_id: string;
  purpose: AuthTokenPurpose;
  token_hash: string;
  email: string;
  expires_at: Timestamp;
  used_at: TimestampNullable;
  created_at: Generated<Date>;
}

export interface CrewInvitationsTable {
  id: Generated<string>;
  crew_id: string;
  email: string;
  role: Role;
  token_hash: string;
  invited_by: string | null;
  expires_at: Timestamp;
  accepted_at: TimestampNullable;
  accepted_by: string | null;
  revoked_at: TimestampNullable;
  created_at: Generated<Date>;
}

export interface AuditEventsTable {
  id: Generated<number>;
  crew_id: string | null;
  actor_user_id: string | null;
  subject_user_id: string | null;
  kind: string;
  detail: Json<Record<string, unknown>>;
  ip: string | null;
  at: Generated<Date>;
}

/** rate-limiter-flexible's counters (RateLimiterPostgres). */
export interface RateLimitsTable {
  key: string;
  points: number;
  expire: number | null;
}

export type UserRow = Selectable<UsersTable>;
export type NewUserRow = Insertable<UsersTable>;
export type CrewRow = Selectable<CrewsTable>;
export type MachineRow = Selectable<MachinesTable>;
export type NewMachineRow = Insertable<MachinesTable>;
export type MachineRowUpdate = Updateable<MachinesTable>;
export type OilChangeRow = Selectable<OilChangesTable>;
export type SampleRow = Selectable<SamplesTable>;
export type ReadingRow = Selectable<ReadingsTable>;
export type FindingRow = Selectable<FindingsTable>;
export type IntervalCallRow = Selectable<IntervalCallsTable>;
export type WearPartRow = Selectable<WearPartsTable>;
export type WearMeasurementRow = Selectable<WearMeasurementsTable>;

// ---- mail (migration 2026_12_02_0300)

/** One outgoing message, written in the caller's transaction; the worker sets sent_at once the relay accepted it. */
export interface MailOutboxTable {
  id: Generated<string>;
  idempotency_key: string;
  kind: string;
  to_address: string;
  subject: string;
  text_body: string;
  html_body: string;
  headers: Json<Record<string, string>>;
  message_id: string;
  attempts: Generated<number>;
  last_error: string | null;
  last_attempt_at: TimestampNullable;
  next_attempt_at: Generated<Date>;
  sent_at: TimestampNullable;
  failed_at: TimestampNullable;
  relay_response: string | null;
  created_at: Generated<Date>;
}

/** What the local fake relay received (development and tests only). */
export interface DevMailboxTable {
  id: Generated<number>;
  message_id: string | null;
  envelope_from: string | null;
  envelope_to: string;
  from_header: string | null;
  to_header: string | null;
  subject: Generated<string>;
  text_body: string | null;
  html_body: string | null;
  raw: string;
  received_at: Generated<Date>;
}

export type MailOutboxRow = Selectable<MailOutboxTable>;
export type DevMailboxRow = Selectable<DevMailboxTable>;

// ---- alerts and reminders (migration 2026_12_02_0700)

export type NotificationKind =
  'import_findings' | 'sample_due' | 'shipped_overdue' | 'invitation_pending' | 'lab_report_arrived';
export type NotificationDelivery = 'immediate' | 'digest' | 'off';

/** How one user wants one kind of message from one crew; no row means the kind's default. */
export interface NotificationPreferencesTable {
  user_id: string;
  crew_id: string;
  kind: NotificationKind;
  delivery: NotificationDelivery;
  updated_at: Generated<Date>;
}

/** One logical alert given to one user (immediately or into the digest); its key makes re-runs no-ops. */
export interface AlertDeliveriesTable {
  dedupe_key: string;
  user_id: string;
  crew_id: string;
  kind: NotificationKind;
  delivery: 'immediate' | 'digest';
  created_at: Generated<Date>;
}

/** A line of a digest item: words, and the page it points to. */
export interface AlertLine {
  text: string;
  url?: string;
}

/** An alert waiting for the user's daily digest. */
export interface AlertDigestItemsTable {
  id: Generated<string>;
  dedupe_key: string;
  user_id: string;
  crew_id: string;
  kind: NotificationKind;
  title: string;
  lines: Json<AlertLine[]>;
  created_at: Generated<Date>;
  digested_at: TimestampNullable;
  digest_key: string | null;
}

// ---- new-oil references (migration 2026_12_02_1400)

/** A reading of the oil as poured, as stored in new_oil_references.readings. */
export interface NewOilReadingJson {
  value: number;
  qualifier?: '<' | '>';
}

/** The oil as poured, per crew and oil product: from the data sheet or from a lab bottle of new oil. */
export interface NewOilReferencesTable {
  id: Generated<string>;
  crew_id: string;
  product_name: string;
  /** product_name trimmed, lower-cased, runs of spaces made one: what samples are matched by. */
  product_key: string;
  source: 'lab' | 'data-sheet';
  sae_grade: Generated<string>;
  readings: Json<Record<string, NewOilReadingJson>>;
  bottle_code: string | null;
  bottle_code_norm: string | null;
  lab_import_id: string | null;
  results_on: DateText | null;
  note: Generated<string>;
  created_by: string | null;
  created_at: Generated<Date>;
  updated_at: Generated<Date>;
}

export type NewOilReferenceRow = Selectable<NewOilReferencesTable>;

// ---- lab reports by e-mail (migration 2026_12_02_1600)

/** A crew's import address: labs mail results to <token>@<INBOUND_MAIL_DOMAIN>. */
export interface ImportAddressesTable {
  crew_id: string;
  token: string;
  created_at: Generated<Date>;
  rotated_at: TimestampNullable;
  rotated_by: string | null;
}

/** The crew's allow-list of lab addresses; an empty list accepts any sender that knows the address. */
export interface ImportAddressSendersTable {
  crew_id: string;
  address: string;
  added_by: string | null;
  added_at: Generated<Date>;
}

export type InboundMailStatus = 'received' | 'processed' | 'set_aside' | 'refused';

/** One inbound message: stored raw on receipt, then processed by the worker. */
export interface InboundMailsTable {
  id: Generated<string>;
  received_at: Generated<Date>;
  via: 'smtp' | 'webhook';
  envelope_from: string | null;
  recipient: string;
  crew_id: string | null;
  raw: Buffer | null;
  raw_sha256: string | null;
  byte_size: number;
  status: InboundMailStatus;
  reason: string | null;
  from_address: string | null;
  subject: string | null;
  lab_file_ids: Json<string[]>;
  processed_at: TimestampNullable;
}

/** The baseline band a rule used for one measurand of one sample (only ready bands are stored). */
export interface BaselineBandsTable {
  sample_id: string;
  measurand: string;
  basis: 'rate' | 'ppm';
  n: number;
  mean: number;
  lower_edge: number;
  watch_above: number;
  act_from: number;
  /** Multiply a band figure by this for ppm as reported at that sample (1 on a ppm basis). */
  to_reported: number;
  /** 'crew': the crew's other machines of the same engine, while the machine's own baseline builds. */
  source: ColumnType<'own' | 'crew', 'own' | 'crew' | undefined, 'own' | 'crew'>;
  /** "from the crew's other 450 cc liquid-cooled singles" on a crew band; null on an own band. */
  source_label: ColumnType<string | null, string | null | undefined, string | null>;
  /** How many other machines a crew band pooled; null on an own band. */
  source_machines: ColumnType<number | null, number | null | undefined, number | null>;
}

/** A band's own columns, everything but its sample: what the screens read and what COPY writes after the sample id. */
export const BAND_FIGURE_COLUMNS = [
  'measurand',
  'basis',
  'n',
  'mean',
  'lower_edge',
  'watch_above',
  'act_from',
  'to_reported',
  'source',
  'source_label',
  'source_machines',
] as const satisfies readonly (keyof BaselineBandsTable)[];

/** Every table Kysely may touch: one interface, one line per table (a new migration adds its table here). */
export interface Database {
  users: UsersTable;
  crews: CrewsTable;
  crew_members: CrewMembersTable;
  sessions: SessionsTable;
  machines: MachinesTable;
  oil_changes: OilChangesTable;
  photos: PhotosTable;
  samples: SamplesTable;
  sample_events: SampleEventsTable;
  wear_parts: WearPartsTable;
  wear_measurements: WearMeasurementsTable;
  lab_files: LabFilesTable;
  lab_profiles: LabProfilesTable;
  lab_imports: LabImportsTable;
  readings: ReadingsTable;
  reading_history: ReadingHistoryTable;
  findings: FindingsTable;
  interval_calls: IntervalCallsTable;
  review_notes: ReviewNotesTable;
  crew_limits: CrewLimitsTable;
  auth_tokens: AuthTokensTable;
  crew_invitations: CrewInvitationsTable;
  audit_events: AuditEventsTable;
  rate_limits: RateLimitsTable;
  bottle_code_reservations: BottleCodeReservationsTable;
  mail_outbox: MailOutboxTable;
  dev_mailbox: DevMailboxTable;
  notification_preferences: NotificationPreferencesTable;
  alert_deliveries: AlertDeliveriesTable;
  alert_digest_items: AlertDigestItemsTable;
  new_oil_references: NewOilReferencesTable;
  import_addresses: ImportAddressesTable;
  import_address_senders: ImportAddressSendersTable;
  inbound_mails: InboundMailsTable;
  baseline_bands: BaselineBandsTable;
}
