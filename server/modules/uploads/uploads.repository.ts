import { Op, Sequelize, type Transaction } from 'sequelize';
import type { UploadSummary } from '@/schemas/measurement';
import { MeasurementModel } from '../measurements/measurement.model';
import { UserModel } from '../users/user.model';
import { UploadModel } from './upload.model';

/** Kind of an uploaded kinetic plate file. */
export const PLATE_UPLOAD_KIND = 'plate';

const summaryAttributes = ['id', 'caseId', 'kind', 'filename', 'mimeType', 'sizeBytes', 'sha256', 'uploadedById', 'createdAt'] as const;

async function summaries(rows: UploadModel[], transaction?: Transaction): Promise<UploadSummary[]> {
  if (rows.length === 0) return [];
  const ids = rows.map((r) => r.id);
  const userIds = [...new Set(rows.map((r) => r.uploadedById).filter((i): i is number => i !== null))];
  const [users, counts] = await Promise.all([
    userIds.length ? UserModel.findAll({ where: { id: { [Op.in]: userIds } }, attributes: ['id', 'name'], transaction }) : [],
    MeasurementModel.findAll({
      where: { uploadId: { [Op.in]: ids } },
      attributes: ['uploadId', [Sequelize.fn('COUNT', Sequelize.col('id')), 'n']],
      group: ['uploadId'],
      raw: true,
      transaction,
    }) as unknown as Promise<{ uploadId: number; n: number }[]>,
  ]);
  const names = new Map(users.map((u) => [u.id, u.name]));
  const n = new Map(counts.map((c) => [c.uploadId, Number(c.n)]));
  return rows.map((r) => ({
    id: r.id,
    caseId: r.caseId,
    kind: r.kind,
    filename: r.filename,
    mimeType: r.mimeType,
    sizeBytes: r.sizeBytes,
    sha256: r.sha256,
    uploadedBy: r.uploadedById === null ? null : (names.get(r.uploadedById) ?? null),
    createdAt: r.createdAt.toISOString(),
    measurementCount: n.get(r.id) ?? 0,
  }));
}

export async function listUploadsOfCase(caseId: number, transaction?: Transaction): Promise<UploadSummary[]> {
  const rows = await UploadModel.findAll({
    where: { caseId },
    attributes: [...summaryAttributes],
    order: [['id', 'DESC']],
    transaction,
  });
  return summaries(rows, transaction);
}

export async function findUploadSummary(id: number, transaction?: Transaction): Promise<UploadSummary | null> {
  const row = await UploadModel.findByPk(id, { attributes: [...summaryAttributes], transaction });
  return row ? (await summaries([row], transaction))[0]! : null;
}

export async function findUploadContent(id: number): Promise<{ summary: UploadSummary; content: Buffer } | null> {
  const row = await UploadModel.findByPk(id);
  if (!row) return null;
  return { summary: (await summaries([row]))[0]!, content: Buffer.from(row.content) };
}

export async function insertUpload(
  data: { caseId: number | null; kind: string; filename: string; mimeType: string; content: Buffer; sha256: string; uploadedById: number | null },
  transaction: Transaction,
): Promise<number> {
  const row = await UploadModel.create({ ...data, sizeBytes: data.content.byteLength }, { transaction });
  return row.id;
}
