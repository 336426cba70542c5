import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import {
  type BatchComment,
  batchCommentListSchema,
  batchCommentSchema,
  type CreateCommentRequest,
} from '@equilight/contracts';
import type { Observable } from 'rxjs';
import { parsed } from '../core/http/api-response';

export type { BatchComment } from '@equilight/contracts';

const comment = parsed(batchCommentSchema, 'comment');

/** A batch's comments: read, add, remove. */
@Injectable({ providedIn: 'root' })
export class BatchCommentsService {
  private readonly http = inject(HttpClient);

  /** In reading order: each thread's first comment, then its replies, oldest first. */
  list(batchId: number): Observable<BatchComment[]> {
    return this.http
      .get<unknown>(`/api/batches/${batchId}/comments`)
      .pipe(parsed(batchCommentListSchema, 'list of comments'));
  }

  add(batchId: number, request: CreateCommentRequest): Observable<BatchComment> {
    return this.http.post<unknown>(`/api/batches/${batchId}/comments`, request).pipe(comment);
  }

  remove(batchId: number, commentId: number): Observable<BatchComment> {
    return this.http.delete<unknown>(`/api/batches/${batchId}/comments/${commentId}`).pipe(comment);
  }
}
