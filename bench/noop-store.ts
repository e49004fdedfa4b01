/**
 * An audit store that stores nothing (benchmark only): the same interface as the real stores, so the cost of
 * the durable audit write can be measured by difference. Never used by the service outside bench/.
 */
import type { AuditStore, OverviewAggregates, StoredAdvice } from '../src/audit/types.js';

export class NoopAuditStore implements AuditStore {
  readonly kind = 'noop';
  private seq = 0;
  async init(): Promise<void> {}
  async append(): Promise<{ seq: number; hash: string }> {
    this.seq += 1;
    return { seq: this.seq, hash: '0'.repeat(64) };
  }
  async get(): Promise<undefined> {
    return undefined;
  }
  async list(): Promise<{ items: [] }> {
    return { items: [] };
  }
  async cardOwner(): Promise<undefined> {
    return undefined;
  }
  async addFeedback(rows: unknown[]): Promise<{ stored: number; duplicates: number }> {
    return { stored: 0, duplicates: rows.length };
  }
  async feedbackFor(): Promise<[]> {
    return [];
  }
  async *records(): AsyncGenerator<StoredAdvice> {}
  async feedbackStats(): Promise<{ byKind: []; byReason: [] }> {
    return { byKind: [], byReason: [] };
  }
  async overview(): Promise<OverviewAggregates> {
    return { answersByDay: [], feedbackByWeek: [], overrideReasonsByWeek: [], verdictsByWeek: [], latencyByDay: [] };
  }
  async verifyChain(): Promise<{ ok: boolean; checked: number }> {
    return { ok: true, checked: 0 };
  }
  async ping(): Promise<void> {}
  async close(): Promise<void> {}
}
