import type { Sequelize } from 'sequelize';
import type { RegisterCaseInput, ReceiveSpecimenInput } from '@/schemas/case';
import type { User } from '@/schemas/user';
import { transitionCase } from '../../modules/cases/case-state';
import { cancelCase, registerCase } from '../../modules/cases/cases.service';
import { registerPatient } from '../../modules/patients/patients.service';
import { addRejectionReason, receiveSpecimen } from '../../modules/specimens/specimens.service';
import { findUserByEmail, publicUser } from '../../modules/users/users.repository';

/*
 * Invented patients and referrals of the fictitious Fernhollow laboratory. Every name, identifier, history and
 * date here is made up; any likeness to a real person is accidental.
 */

/** Reasons a specimen may be refused on receipt; directors can add more. */
export const starterRejectionReasons = [
  'Thawed in transit',
  'Too small for the requested assays',
  'Unlabelled or mislabelled container',
];

export const demoCaseNames = [
  'normal',
  'isolatedCI',
  'isolatedCIV',
  'combined',
  'raisedCS',
  'corrected',
  'awaitingReview',
  'fibroblasts',
  'liverAndMuscle',
  'rejected',
  'heartUrgent',
  'lymphoblasts',
  'cancelled',
] as const;
export type DemoCaseName = (typeof demoCaseNames)[number];
/** The seeded cases' ids, by the role each plays in the demo (later seeds attach results and reports). */
export type DemoCaseIds = Record<DemoCaseName, number>;

type DemoSpecimen = Omit<ReceiveSpecimenInput, 'collectedAt' | 'receivedAt'> & { collectedDaysAgo: number; receivedDaysAgo: number };
type DemoCase = {
  name: DemoCaseName;
  patient: number;
  clinician: 'clinician@demo.test' | 'clinician2@demo.test';
  indication: string;
  priority: RegisterCaseInput['priority'];
  specimens: DemoSpecimen[];
  state: 'received' | 'in_assay' | 'cancelled';
  cancelReason?: string;
};

const patients = [
  { labPatientId: 'DEMO-0001', familyName: 'Quillfeather', givenName: 'Marigold', dateOfBirth: '2016-05-14', sex: 'female' },
  { labPatientId: 'DEMO-0002', familyName: 'Thistlewood', givenName: 'Barnaby', dateOfBirth: '2024-11-02', sex: 'male' },
  { labPatientId: 'DEMO-0003', familyName: 'Pennywhistle', givenName: 'Odessa', dateOfBirth: '2021-02-27', sex: 'female' },
  { labPatientId: 'DEMO-0004', familyName: 'Mossgrove', givenName: 'Ferdinand', dateOfBirth: '2025-01-19', sex: 'male' },
  { labPatientId: 'DEMO-0005', familyName: 'Applebeck', givenName: 'Wren', dateOfBirth: '1988-09-03', sex: 'female' },
  { labPatientId: 'DEMO-0006', familyName: 'Larkspur', givenName: 'Caspian', dateOfBirth: '2019-07-22', sex: 'male' },
  { labPatientId: 'DEMO-0007', familyName: 'Hollowell', givenName: 'Juniper', dateOfBirth: '2010-12-08', sex: 'female' },
  { labPatientId: 'DEMO-0008', familyName: 'Fennimore-Grey', givenName: 'Tobias', dateOfBirth: '2025-08-30', sex: 'male' },
  { labPatientId: 'DEMO-0009', familyName: 'Brambleton', givenName: 'Ottilie', dateOfBirth: '2024-03-11', sex: 'female' },
  { labPatientId: 'DEMO-0010', familyName: 'Kettleby', givenName: 'Rufus', dateOfBirth: '1996-04-25', sex: 'male' },
  { labPatientId: 'DEMO-0011', familyName: 'Quince', givenName: 'Isadora', dateOfBirth: '2008-06-16', sex: 'female' },
  { labPatientId: 'DEMO-0012', familyName: 'Dunmoor', givenName: 'Percival', dateOfBirth: '2018-10-05', sex: 'male' },
] as const;

const muscle = (receivedDaysAgo: number, wetWeightMg: number, source = 'Vastus lateralis, open biopsy'): DemoSpecimen => ({
  type: 'skeletal_muscle',
  source,
  collectedDaysAgo: receivedDaysAgo + 1,
  receivedDaysAgo,
  transportCondition: 'dry_ice',
  wetWeightMg,
  accepted: true,
  rejectionReason: null,
});

const cases: DemoCase[] = [
  {
    name: 'normal',
    patient: 0,
    clinician: 'clinician@demo.test',
    indication: 'Exercise intolerance and muscle pain after exertion; creatine kinase mildly raised. Exclude a respiratory-chain defect.',
    priority: 'routine',
    specimens: [muscle(40, 62)],
    state: 'in_assay',
  },
  {
    name: 'isolatedCI',
    patient: 1,
    clinician: 'clinician@demo.test',
    indication: 'Infant with lactic acidosis, hypotonia and poor feeding; MRI shows symmetrical basal ganglia signal change.',
    priority: 'urgent',
    specimens: [muscle(36, 48)],
    state: 'in_assay',
  },
  {
    name: 'isolatedCIV',
    patient: 2,
    clinician: 'clinician2@demo.test',
    indication: 'Progressive encephalopathy with raised CSF lactate; cytochrome c oxidase deficiency suspected.',
    priority: 'routine',
    specimens: [muscle(33, 55)],
    state: 'in_assay',
  },
  {
    name: 'combined',
    patient: 3,
    clinician: 'clinician2@demo.test',
    indication: 'Hepatopathy, failure to thrive and lactic acidosis since the neonatal period.',
    priority: 'urgent',
    specimens: [muscle(30, 41, 'Quadriceps, needle biopsy')],
    state: 'in_assay',
  },
  {
    name: 'raisedCS',
    patient: 4,
    clinician: 'clinician@demo.test',
    indication: 'Adult with ptosis and external ophthalmoplegia; ragged-red fibres on muscle histology.',
    priority: 'routine',
    specimens: [muscle(27, 74, 'Deltoid, open biopsy')],
    state: 'in_assay',
  },
  {
    name: 'corrected',
    patient: 5,
    clinician: 'clinician@demo.test',
    indication: 'Developmental regression and seizures; plasma lactate 4.1 mmol/L.',
    priority: 'routine',
    specimens: [muscle(24, 58)],
    state: 'in_assay',
  },
  {
    name: 'awaitingReview',
    patient: 6,
    clinician: 'clinician2@demo.test',
    indication: 'Cardiomyopathy and proximal weakness in a teenager; family history of early cardiac death.',
    priority: 'routine',
    specimens: [muscle(20, 66)],
    state: 'in_assay',
  },
  {
    name: 'fibroblasts',
    patient: 7,
    clinician: 'clinician@demo.test',
    indication: 'Neonate with overwhelming lactic acidosis; skin biopsy cultured for enzyme studies.',
    priority: 'urgent',
    specimens: [
      {
        type: 'fibroblasts',
        source: 'Forearm skin biopsy; culture at passage 6',
        collectedDaysAgo: 45,
        receivedDaysAgo: 16,
        transportCondition: 'dry_ice',
        wetWeightMg: null,
        accepted: true,
        rejectionReason: null,
      },
    ],
    state: 'in_assay',
  },
  {
    name: 'liverAndMuscle',
    patient: 8,
    clinician: 'clinician2@demo.test',
    indication: 'Acute liver failure in infancy with hypoglycaemia; liver and muscle taken at the same procedure.',
    priority: 'urgent',
    specimens: [
      {
        type: 'liver',
        source: 'Liver, wedge biopsy',
        collectedDaysAgo: 6,
        receivedDaysAgo: 5,
        transportCondition: 'liquid_nitrogen',
        wetWeightMg: 35,
        accepted: true,
        rejectionReason: null,
      },
      muscle(5, 44, 'Vastus lateralis, same procedure'),
    ],
    state: 'received',
  },
  {
    name: 'rejected',
    patient: 9,
    clinician: 'clinician@demo.test',
    indication: 'Exertional weakness with raised lactate; possible mitochondrial myopathy.',
    priority: 'routine',
    specimens: [
      {
        type: 'skeletal_muscle',
        source: 'Vastus lateralis, needle biopsy',
        collectedDaysAgo: 4,
        receivedDaysAgo: 3,
        transportCondition: 'thawed',
        wetWeightMg: 38,
        accepted: false,
        rejectionReason: 'Thawed in transit',
      },
    ],
    state: 'received',
  },
  {
    name: 'heartUrgent',
    patient: 10,
    clinician: 'clinician2@demo.test',
    indication: 'Hypertrophic cardiomyopathy with lactic acidosis; heart muscle from the explanted heart.',
    priority: 'urgent',
    specimens: [
      {
        type: 'heart_muscle',
        source: 'Left ventricle, explant',
        collectedDaysAgo: 2,
        receivedDaysAgo: 1,
        transportCondition: 'liquid_nitrogen',
        wetWeightMg: 120,
        accepted: true,
        rejectionReason: null,
      },
    ],
    state: 'received',
  },
  {
    name: 'lymphoblasts',
    patient: 11,
    clinician: 'clinician@demo.test',
    indication: 'Sibling of an affected child; lymphoblastoid cell line sent for screening.',
    priority: 'routine',
    specimens: [
      {
        type: 'lymphoblasts',
        source: 'EBV-transformed cell line, pellet',
        collectedDaysAgo: 12,
        receivedDaysAgo: 2,
        transportCondition: 'dry_ice',
        wetWeightMg: null,
        accepted: true,
        rejectionReason: null,
      },
    ],
    state: 'received',
  },
  {
    name: 'cancelled',
    patient: 1,
    clinician: 'clinician@demo.test',
    indication: 'Second referral for the same infant, sent by the ward before the first was acknowledged.',
    priority: 'routine',
    specimens: [muscle(35, 12, 'Vastus lateralis, residual fragment')],
    state: 'cancelled',
    cancelReason: 'Duplicate referral: the specimen belongs to the case already registered for this infant.',
  },
];

const DAY = 86_400_000;

/** A whole number of days before `now`, at a plausible working hour, as an ISO instant. */
function daysAgo(now: Date, days: number, hourUtc: number): string {
  const d = new Date(now.getTime() - days * DAY);
  d.setUTCHours(hourUtc, 15 + (days % 4) * 10, 0, 0);
  return (d.getTime() > now.getTime() ? new Date(d.getTime() - DAY) : d).toISOString();
}

async function actorFor(email: string): Promise<User> {
  const u = await findUserByEmail(email);
  if (!u) throw new Error(`demo seed: account ${email} is missing`);
  return publicUser(u);
}

/**
 * Seeds the rejection reasons and the demo patients and cases (states received, in assay and cancelled).
 * Returns each case's id by its demo role, for later seeds to attach measurements and reports.
 */
export async function seedDemoCases(sequelize: Sequelize, now = new Date()): Promise<DemoCaseIds> {
  for (const text of starterRejectionReasons) await addRejectionReason(sequelize, null, { text });
  const tech = await actorFor('technologist@demo.test');
  const clinicians = {
    'clinician@demo.test': await actorFor('clinician@demo.test'),
    'clinician2@demo.test': await actorFor('clinician2@demo.test'),
  };
  const patientIds: number[] = [];
  for (const p of patients) patientIds.push((await registerPatient(sequelize, tech, p)).id);

  // Registered oldest first, so accession numbers follow receipt order.
  const ordered = [...cases].sort((a, b) => b.specimens[0]!.receivedDaysAgo - a.specimens[0]!.receivedDaysAgo);
  const ids = {} as DemoCaseIds;
  for (const c of ordered) {
    const toInput = (s: DemoSpecimen): ReceiveSpecimenInput => {
      const { collectedDaysAgo, receivedDaysAgo, ...rest } = s;
      return { ...rest, collectedAt: daysAgo(now, collectedDaysAgo, 9), receivedAt: daysAgo(now, receivedDaysAgo, 11) };
    };
    const [first, ...more] = c.specimens;
    let detail = await registerCase(sequelize, tech, {
      patientId: patientIds[c.patient]!,
      referringClinicianId: clinicians[c.clinician].id,
      clinicalIndication: c.indication,
      priority: c.priority,
      specimen: toInput(first!),
    });
    for (const s of more) await receiveSpecimen(sequelize, tech, detail.id, toInput(s));
    if (c.state === 'in_assay') {
      detail = await transitionCase(sequelize, tech, detail.id, 'in_assay', { version: detail.version });
    } else if (c.state === 'cancelled') {
      detail = await cancelCase(sequelize, tech, detail.id, { reason: c.cancelReason!, version: detail.version });
    }
    ids[c.name] = detail.id;
  }
  return ids;
}
