import type { Transaction } from 'sequelize';
import { AuditEvent } from '../models/index.ts';

export type AuditAction =
  | 'sign-in'
  | 'sign-in-failed'
  | 'sign-out'
  | 'role-changed'
  | 'person-deactivated'
  | 'person-reactivated'
  | 'invitation-sent'
  | 'password-reset-requested'
  | 'password-set'
  | 'item-ingested'
  | 'metadata-imported'
  | 'review-subject-accepted'
  | 'review-subject-added'
  | 'review-subject-rejected'
  | 'review-subject-undone'
  | 'review-description-saved'
  | 'review-item-approved'
  | 'review-item-skipped'
  | 'review-caption-flagged'
  | 'review-caption-unflagged'
  | 'review-example-promoted'
  | 'review-second-recorded'
  | 'review-settings-changed'
  | 'collection-created'
  | 'collection-changed'
  | 'collection-archived'
  | 'collection-restored'
  | 'subject-created'
  | 'subject-changed'
  | 'subject-moved'
  | 'subject-retired'
  | 'example-added'
  | 'example-removed'
  | 'subject-model-made'
  | 'vocabulary-imported';

export interface AuditInput {
  action: AuditAction;
  actorId?: number | null;
  targetType?: string;
  targetId?: string | number;
  detail?: Record<string, unknown>;
  ip?: string | null;
}

/** Appends one audit event. Pass the transaction of the change it records, so both land or neither. */
export async function audit(input: AuditInput, transaction?: Transaction): Promise<void> {
  await AuditEvent.create(
    {
      action: input.action,
      actorId: input.actorId ?? null,
      targetType: input.targetType ?? null,
      targetId: input.targetId === undefined ? null : String(input.targetId),
      detail: input.detail ?? null,
      ip: input.ip ?? null,
    },
    { transaction },
  );
}
