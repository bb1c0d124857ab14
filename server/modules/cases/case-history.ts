import { caseStateLabels, priorities, transportConditionLabels, type CaseHistoryChange, type CaseHistoryEvent, type CaseState } from '@/schemas/case';
import { specimenTypeLabels, type SpecimenType } from '@/schemas/common';
import { notFound } from '../../lib/errors';
import * as repo from './cases.repository';
import { wallClock } from './lab-time';
import { labTimeZone } from './lab-zone';

type FieldSpec = { label: string; format?: (v: unknown, tz: string) => string };

const pad = (n: number) => String(n).padStart(2, '0');
function labDateTime(v: unknown, tz: string): string {
  const d = new Date(String(v));
  if (Number.isNaN(d.getTime())) return String(v);
  const w = wallClock(d, tz);
  return `${w.year}-${pad(w.month)}-${pad(w.day)} ${pad(w.hour)}:${pad(w.minute)}`;
}
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
    wetWeightMg: { label: 'Wet weight (mg)' },
    accepted: { label: 'Receipt', format: (v) => (v ? 'Accepted' : 'Rejected') },
    rejectionReason: { label: 'Rejection reason' },
    proteinMgPerMl: { label: 'Protein (mg/mL)' },
    proteinSource: { label: 'Protein source' },
  },
  patient: {
    labPatientId: { label: 'Lab patient ID' },
    familyName: { label: 'Family name' },
    givenName: { label: 'Given name' },
    dateOfBirth: { label: 'Date of birth' },
    sex: { label: 'Sex', format: (v) => ({ female: 'Female', male: 'Male', other: 'Other', unknown: 'Not known' })[String(v)] ?? String(v) },
  },
};

/** Bookkeeping keys never shown as changes of a record of an unknown kind. */
const hiddenKeys = new Set(['id', 'version', 'caseId', 'createdAt', 'updatedAt', 'createdById']);

function show(v: unknown, spec: FieldSpec | undefined, tz: string): string | null {
  if (v === null || v === undefined || v === '') return null;
  if (spec?.format) return spec.format(v, tz);
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
  const keys = specs ? Object.keys(specs) : [...new Set([...Object.keys(b), ...Object.keys(a)])].filter((k) => !hiddenKeys.has(k));
  const changes: CaseHistoryChange[] = [];
  for (const key of keys) {
    if (!(key in a) && !(key in b)) continue;
    if (JSON.stringify(a[key] ?? null) === JSON.stringify(b[key] ?? null)) continue;
    const spec = specs?.[key];
    const change = { field: spec?.label ?? key, before: show(b[key], spec, tz), after: show(a[key], spec, tz) };
    if (change.before !== change.after) changes.push(change);
  }
  return changes;
}

function summarise(e: repo.StoredAuditEvent): string {
  const a = asObject(e.after);
  const b = asObject(e.before);
  const specimen = `Specimen ${String(a.label ?? b.label ?? e.entityId ?? '')}`.trim();
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
    case 'measurement:exclude':
      return `${String(a.assay ?? '')} replicate ${String(a.replicate ?? '')} excluded from the results`;
    case 'measurement:include':
      return `${String(a.assay ?? '')} replicate ${String(a.replicate ?? '')} counted again`;
    case 'report:amend':
      return `Signed version ${String(b.reportVersion ?? '')} reopened for amendment`.replace('  ', ' ');
    default: {
      const what = e.entity.replace(/[-_]/g, ' ');
      return `${what.charAt(0).toUpperCase()}${what.slice(1)}: ${e.action.replace(/[-_]/g, ' ')}`;
    }
  }
}

/** Everything that happened to a case, newest first, each event with who, when and what changed. */
export async function caseHistory(caseId: number): Promise<CaseHistoryEvent[]> {
  const c = await repo.findCaseById(caseId);
  if (!c) throw notFound('Case', caseId);
  const tz = await labTimeZone();
  const events = await repo.listCaseAuditEvents(caseId, c.patientId);
  return events.map((e) => ({
    id: e.id,
    at: e.at.toISOString(),
    actorName: e.actorName,
    actorEmail: e.actorEmail,
    action: e.action,
    entity: e.entity,
    entityId: e.entityId,
    summary: summarise(e),
    note: e.note,
    changes: diffFields(e.entity, e.before, e.after, tz),
  }));
}
