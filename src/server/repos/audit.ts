/** Audit trail: every change writes who, what, when, before and after, in the same transaction. */
import type { Prisma } from '@/generated/sqlite/client';

type Tx = Prisma.TransactionClient;

export async function audit(
  tx: Tx,
  actor: string,
  action: string,
  entity: string,
  entityId: string,
  before: unknown,
  after: unknown,
): Promise<void> {
  await tx.auditEvent.create({
    data: {
      actor,
      action,
      entity,
      entityId,
      beforeJson: before === undefined || before === null ? null : JSON.stringify(before),
      afterJson: after === undefined || after === null ? null : JSON.stringify(after),
    },
  });
}
