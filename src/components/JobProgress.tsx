'use client';
/**
 * A running job on the page: a progress bar with the job's own message ("start 37 of 100, best
 * D-efficiency 0.81"), a Cancel button, and the outcome once it ends. The job is polled twice a second;
 * its id lives in the page's URL, so a person may leave and come back to it.
 */
import { useEffect, useRef, useState } from 'react';
import { callApi, postJson, type ApiError } from './api-client';
import { ErrorBox } from './FieldError';
import './job-progress.css';

export type JobStatus = 'queued' | 'running' | 'done' | 'failed' | 'cancelled';

export interface JobState<R = unknown> {
  id: string;
  kind: string;
  status: JobStatus;
  progress: number;
  message: string;
  cancelRequested?: boolean;
  result?: R;
  error?: ApiError;
  createdAt: string;
  startedAt?: string;
  finishedAt?: string;
}

export const jobFinished = (s: JobStatus) => s === 'done' || s === 'failed' || s === 'cancelled';

/** Poll a job until it ends; `onEnd` is called once with its final state. */
export function useJob<R>(id: string | null, onEnd?: (job: JobState<R>) => void, intervalMs = 500) {
  const [job, setJob] = useState<JobState<R> | null>(null);
  const [error, setError] = useState<ApiError | null>(null);
  const endRef = useRef(onEnd);
  useEffect(() => {
    endRef.current = onEnd;
  }, [onEnd]);
  useEffect(() => {
    if (!id) return;
    let stop = false;
    let timer: ReturnType<typeof setTimeout> | undefined;
    const poll = async () => {
      const res = await callApi<JobState<R>>(`/api/v1/jobs/${encodeURIComponent(id)}`, 'GET');
      if (stop) return;
      if (!res.ok) {
        setError(res.error);
        // A network hiccup is retried; an unknown job is not.
        if (res.status === 0 || res.status >= 500) timer = setTimeout(poll, intervalMs * 4);
        return;
      }
      setError(null);
      setJob(res.data);
      if (jobFinished(res.data.status)) endRef.current?.(res.data);
      else timer = setTimeout(poll, intervalMs);
    };
    void poll();
    return () => {
      stop = true;
      clearTimeout(timer);
    };
  }, [id, intervalMs]);
  return { job: id ? job : null, error };
}

const STATUS_TEXT: Record<JobStatus, string> = {
  queued: 'waiting for a free worker',
  running: 'running',
  done: 'done',
  failed: 'failed',
  cancelled: 'cancelled',
};

/** The bar, the message and the Cancel button of one job (polling is the caller's, through useJob). */
export function JobProgress({ job, label, error }: { job: JobState | null; label: string; error?: ApiError | null }) {
  const [cancelError, setCancelError] = useState<ApiError | null>(null);
  const [asked, setAsked] = useState(false);
  if (!job) return <ErrorBox error={error ?? null} />;
  const pct = Math.round(job.progress * 100);
  const ended = jobFinished(job.status);
  async function cancel() {
    setAsked(true);
    setCancelError(null);
    const res = await postJson(`/api/v1/jobs/${encodeURIComponent(job!.id)}/cancel`, {});
    if (!res.ok && res.status !== 409) {
      setAsked(false);
      setCancelError(res.error);
    }
  }
  return (
    <div className="job" data-testid="job" data-status={job.status}>
      <div className="job-head">
        <strong>{label}</strong>{' '}
        <span data-testid="job-status" className={`job-status ${job.status}`}>
          {STATUS_TEXT[job.status]}
          {job.status === 'running' && (asked || job.cancelRequested) ? ' — stopping…' : ''}
        </span>
      </div>
      <div
        className="job-bar"
        role="progressbar"
        aria-label={`${label} progress`}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={pct}
        data-testid="job-progress"
      >
        <div className="job-fill" style={{ width: `${pct}%` }} />
      </div>
      <p className="job-message" data-testid="job-message" aria-live="polite">
        {pct}%{job.message ? ` — ${job.message}` : ''}
      </p>
      {!ended ? (
        <button type="button" className="btn danger job-cancel" onClick={cancel} disabled={asked || job.cancelRequested}>
          Cancel {label}
        </button>
      ) : null}
      {job.status === 'failed' && job.error ? <ErrorBox error={job.error} /> : null}
      <ErrorBox error={cancelError ?? error ?? null} />
    </div>
  );
}
