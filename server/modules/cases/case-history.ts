import { caseStateLabels, priorities, transportConditionLabels, type CaseHistoryChange, type CaseHistoryEvent, type CaseState } from '@/schemas/case';
import { specimenTypeLabels, type SpecimenType } from '@/schemas/common';
import { formatCalendarDate, formatInstant } from '@/schemas/date-format';
import { notFound } from '../../lib/errors';
import * as repo from './cases.repository';
import { labTimeZone } from './lab-zone';

/** How a field reads in the history: its name in the bench's words, its unit, and how its value is written. */
type FieldSpec = { label: string; unit?: string; format?: (v: unknown, tz: string) => string };

/** Times as every screen and the PDF write them, in the laboratory's zone ("2 Dec 2026 08:24"). */
function labDateTime(v: unknown, tz: string): string {
  const d = new Date(String(v));
  return Number.isNaN(d.getTime()) ? String(v) : formatInstant(d, tz);
}
const ISO_INSTANT = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}/;
const inputModeWords: Record<string, string> = { rates: 'typed rates', readings: 'pasted readings', plate: 'a plate file' };
const stateLabel = (v: unknown) => caseStateLabels[v as CaseState] ?? String(v);
const priorityLabel = (v: unknown) => (priorities.includes(v as never) ? (v === 'urgent' ? 'Urgent' : 'Routine') : String(v));

/** The fields each kind of record shows in its history, in this order, with how a value reads. */
const fieldSpecs: Record<string, Record<string, FieldSpec>> = {
  case: {
    accession: { label: 'Accession number' },
    patientName: { label: 'Patient' },
    referringClinician: { label: 'Referring clinician' },
    clinicalIndication: { label: 'Clinical indication' },
    priority: { label: 'Priority', format: priorityLabel },
    state: { label: 'State', format: stateLabel },
    reason: { label: 'Reason' },
  },
  specimen: {
    label: { label: 'Label' },
    type: { label: 'Specimen type', format: (v) => specimenTypeLabels[v as SpecimenType] ?? String(v) },
    source: { label: 'Source' },
    collectedAt: { label: 'Collected', format: labDateTime },
    receivedAt: { label: 'Received', format: labDateTime },
    transportCondition: {
      label: 'Transport',
      format: (v) => transportConditionLabels[v as keyof typeof transportConditionLabels] ?? String(v),
    },
    wetWeightMg: { label: 'Wet weight', unit: 'mg' },
    accepted: { label: 'Receipt', format: (v) => (v ? 'Accepted' : 'Rejected') },
    rejectionReason: { label: 'Rejection reason' },
    proteinMgPerMl: { label: 'Protein', unit: 'mg/mL' },
    proteinSource: { label: 'Protein source' },
  },
  measurement: {
    assay: { label: 'Assay' },
    replicate: { label: 'Replicate' },
    inputMode: { label: 'Entered as', format: (v) => inputModeWords[String(v)] ?? String(v) },
    proteinMgPerMl: { label: 'Protein', unit: 'mg/mL' },
    pathlengthCm: { label: 'Path length', unit: 'cm' },
    reactionVolumeUl: { label: 'Reaction volume', unit: 'µL' },
    sampleVolumeUl: { label: 'Sample volume', unit: 'µL' },
    excluded: { label: 'Counted in the results', format: (v) => (v ? 'no' : 'yes') },
    exclusionReason: { label: 'Reason for leaving it out' },
  },
  report: {
    version: { label: 'Version' },
    status: { label: 'Status', format: (v) => stateLabel(v) },
    signedAt: { label: 'Signed', format: labDateTime },
    meaning: { label: 'Meaning of the signature' },
    reason: { label: 'Reason' },
  },
  patient: {
    labPatientId: { label: 'Lab patient ID' },
    familyName: { label: 'Family name' },
    givenName: { label: 'Given name' },
    dateOfBirth: { label: 'Date of birth', format: (v) => formatCalendarDate(String(v)) },
    sex: { label: 'Sex', format: (v) => ({ female: 'Female', male: 'Male', other: 'Other', unknown: 'Not known' })[String(v)] ?? String(v) },
  },
};

/** Bookkeeping keys never shown as changes of a record of an unknown kind (ids, versions, checksums). */
const hiddenKeys = new Set(['id', 'version', 'caseId', 'createdAt', 'updatedAt', 'createdById']);
const hiddenKey = (k: string) => hiddenKeys.has(k) || /(Id|Ids|Sha256|Hash)$/.test(k);

/** "proteinSource" -> "Protein source", for a field no spec names. */
function words(key: string): string {
  const w = key.replace(/([a-z0-9])([A-Z])/g, '$1 $2').replace(/[-_]/g, ' ').toLowerCase();
  return `${w.charAt(0).toUpperCase()}${w.slice(1)}`;
}

function show(v: unknown, spec: FieldSpec | undefined, tz: string): string | null {
  if (v === null || v === undefined || v === '') return null;
  if (spec?.format) return spec.format(v, tz);
  if (typeof v === 'string' && ISO_INSTANT.test(v)) return labDateTime(v, tz);
  if (typeof v === 'string') return v;
  if (typeof v === 'number' || typeof v === 'boolean') return String(v);
  const json = JSON.stringify(v);
  return json.length > 200 ? `${json.slice(0, 199)}…` : json;
}

const asObject = (v: unknown): Record<string, unknown> => (v && typeof v === 'object' && !Array.isArray(v) ? (v as Record<string, unknown>) : {});

/** The before → after pairs of the fields that differ (every filled field, for a record's creation). */
export function diffFields(entity: string, before: unknown, after: unknown, tz: string): CaseHistoryChange[] {
  const b = asObject(before);
  const a = asObject(after);
  const specs = fieldSpecs[entity];
  const keys = specs ? Object.keys(specs) : [...new Set([...Object.keys(b), ...Object.keys(a)])].filter((k) => !hiddenKey(k));
  const changes: CaseHistoryChange[] = [];
  for (const key of keys) {
    if (!(key in a) && !(key in b)) continue;
    if (JSON.stringify(a[key] ?? null) === JSON.stringify(b[key] ?? null)) continue;
    const spec = specs?.[key];
    const change: CaseHistoryChange = { field: spec?.label ?? words(key), before: show(b[key], spec, tz), after: show(a[key], spec, tz) };
    if (spec?.unit) change.unit = spec.unit;
    if (change.before !== change.after) changes.push(change);
  }
  return changes;
}

/** `labels`: each specimen's letter by its id, for events that record only the id (protein). */
function summarise(e: repo.StoredAuditEvent, labels: Map<string | null, string>): string {
  const a = asObject(e.after);
  const b = asObject(e.before);
  const specimen = `Specimen ${String(a.label ?? b.label ?? labels.get(e.entityId) ?? e.entityId ?? '')}`.trim();
  switch (`${e.entity}:${e.action}`) {
    case 'case:create':
      return `Case ${String(a.accession ?? '')} registered`;
    case 'case:update':
      return 'Case details changed';
    case 'case:state-change':
      return `${stateLabel(b.state)} → ${stateLabel(a.state)}`;
    case 'specimen:create':
      return a.accepted === false ? `${specimen} received and rejected` : `${specimen} received`;
    case 'specimen:reject':
      return `${specimen} rejected`;
    case 'specimen:update':
      return `${specimen} changed`;
    case 'patient:create':
      return 'Patient registered';
    case 'patient:update':
      return 'Patient details corrected';
    case 'specimen:protein':
      return b.proteinMgPerMl === undefined || b.proteinMgPerMl === null ? `${specimen}: protein recorded` : `${specimen}: protein changed`;
    case 'measurement:create':
      return `${String(a.assay ?? '')} replicate ${String(a.replicate ?? '')} saved`;
    case 'measurement:update':
      return `${String(a.assay ?? b.assay ?? '')} replicate ${String(a.replicate ?? b.replicate ?? '')} changed`;
    case 'measurement:delete':
      return `${String(b.assay ?? '')} replicate ${String(b.replicate ?? '')} deleted`;
    case 'measurement:recompute':
      return `${String(a.assay ?? b.assay ?? '')} replicate ${String(a.replicate ?? b.replicate ?? '')} worked out again`;
    case 'report:sign':
      return `Report version ${String(a.version ?? '')} signed`.replace('  ', ' ');
    case 'report:correct':
      return `Corrected report version ${String(a.version ?? '')} signed`.replace('  ', ' ');
    case 'interpretation-draft:create':
    case 'interpretation-draft:update':
      return 'Draft interpretation saved';
    case 'upload:create':
      return 'File uploaded';
    case 'measurement:exclude':
      return `${String(a.assay ?? '')} replicate ${String(a.replicate ?? '')} excluded from the results`;
    case 'measurement:include':
      return `${String(a.assay ?? '')} replicate ${String(a.replicate ?? '')} counted again`;
    case 'report:amend':
      return `Signed version ${String(b.reportVersion ?? '')} reopened for amendment`.replace('  ', ' ');
    default:
      return `${words(e.entity)}: ${e.action.replace(/[-_]/g, ' ')}`;
  }
}

/** Everything that happened to a case, newest first, each event with who, when and what changed. */
export async function caseHistory(caseId: number): Promise<CaseHistoryEvent[]> {
  const c = await repo.findCaseById(caseId);
  if (!c) throw notFound('Case', caseId);
  const tz = await labTimeZone();
  const events = await repo.listCaseAuditEvents(caseId, c.patientId);
  const labels = new Map<string | null, string>();
  for (const e of events) {
    const label = asObject(e.after).label;
    if (e.entity === 'specimen' && typeof label === 'string') labels.set(e.entityId, label);
  }
  return events.map((e) => ({
    id: e.id,
    at: e.at.toISOString(),
    actorName: e.actorName,
    actorEmail: e.actorEmail,
    action: e.action,
    entity: e.entity,
    entityId: e.entityId,
    summary: summarise(e, labels),
    note: e.note,
    changes: diffFields(e.entity, e.before, e.after, tz),
  }));
}
