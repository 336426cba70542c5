import { HttpClient } from '@angular/common/http';
import { JsonPipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { MatExpansionModule } from '@angular/material/expansion';
import { MatIconModule } from '@angular/material/icon';
import { catchError, map, of } from 'rxjs';

interface Operation {
  method: string;
  path: string;
  tag: string;
  summary: string;
  description: string;
  parameters: { name: string; in: string; required?: boolean }[];
  body: { contentType: string; schema: unknown }[];
  success: string;
}

interface OpenApiDocument {
  info: { title: string; version: string; description?: string };
  paths: Record<
    string,
    Record<
      string,
      {
        tags?: string[];
        summary?: string;
        description?: string;
        parameters?: Operation['parameters'];
        requestBody?: { content: Record<string, { schema: unknown }> };
        responses?: Record<string, { description?: string }>;
      }
    >
  >;
}

/** Flatten the document into operations grouped by tag, in document order. */
export function operationsByTag(doc: OpenApiDocument): { tag: string; operations: Operation[] }[] {
  const groups = new Map<string, Operation[]>();
  for (const [path, methods] of Object.entries(doc.paths)) {
    for (const [method, op] of Object.entries(methods)) {
      const tag = op.tags?.[0] ?? 'other';
      const success = Object.entries(op.responses ?? {}).find(([code]) => code.startsWith('2'));
      const operation: Operation = {
        method: method.toUpperCase(),
        path,
        tag,
        summary: op.summary ?? '',
        description: op.description ?? '',
        parameters: op.parameters ?? [],
        body: Object.entries(op.requestBody?.content ?? {}).map(([contentType, c]) => ({
          contentType,
          schema: c.schema,
        })),
        success: success ? `${success[0]} ${success[1].description ?? ''}` : '',
      };
      groups.set(tag, [...(groups.get(tag) ?? []), operation]);
    }
  }
  return [...groups].map(([tag, operations]) => ({ tag, operations }));
}

/** The API reference, rendered from /api/openapi.json. */
@Component({
  selector: 'eq-api-docs-page',
  imports: [MatExpansionModule, MatIconModule, JsonPipe],
  template: `
    <section class="eq-page">
      <header class="eq-page-header">
        <h1>API</h1>
        <a href="/api/openapi.json" download="equilight-openapi.json">OpenAPI document (JSON)</a>
      </header>
      @if (doc(); as d) {
        <p>{{ d.info.description }}</p>
        @for (group of groups(); track group.tag) {
          <h2 class="eq-tag">{{ group.tag }}</h2>
          <mat-accordion multi>
            @for (op of group.operations; track op.method + op.path) {
              <mat-expansion-panel>
                <mat-expansion-panel-header>
                  <mat-panel-title>
                    <span class="eq-method" [attr.data-method]="op.method">{{ op.method }}</span>
                    <code>{{ op.path }}</code>
                  </mat-panel-title>
                  <mat-panel-description>{{ op.summary }}</mat-panel-description>
                </mat-expansion-panel-header>
                <p>{{ op.description }}</p>
                <p><strong>Success:</strong> {{ op.success }}</p>
                @if (op.parameters.length) {
                  <p>
                    <strong>Parameters:</strong>
                    @for (p of op.parameters; track p.name) {
                      <code>{{ p.name }}</code> ({{ p.in }}{{ p.required ? ', required' : '' }})&nbsp;
                    }
                  </p>
                }
                @for (b of op.body; track b.contentType) {
                  <p><strong>Body</strong> ({{ b.contentType }}):</p>
                  <pre class="eq-schema">{{ b.schema | json }}</pre>
                }
              </mat-expansion-panel>
            }
          </mat-accordion>
        }
      } @else if (failed()) {
        <p class="eq-error-text" role="alert">The API document could not be loaded.</p>
      } @else {
        <p>Loading…</p>
      }
    </section>
  `,
  styles: `
    .eq-tag {
      font: var(--mat-sys-title-medium);
      text-transform: capitalize;
      margin: 24px 0 8px;
    }
    .eq-method {
      display: inline-block;
      min-width: 4.5em;
      font: var(--mat-sys-label-medium);
      font-family: monospace;
      padding: 2px 6px;
      margin-right: 8px;
      border-radius: 6px;
      border: 1px solid var(--mat-sys-outline);
    }
    .eq-schema {
      max-height: 320px;
      overflow: auto;
      padding: 8px;
      background: var(--mat-sys-surface-container);
      border-radius: 8px;
      font-size: 12px;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ApiDocsPage {
  private readonly result = toSignal(
    inject(HttpClient)
      .get<OpenApiDocument>('/api/openapi.json')
      .pipe(
        map((doc) => ({ doc, failed: false })),
        catchError(() => of({ doc: null, failed: true })),
      ),
  );
  protected readonly doc = computed(() => this.result()?.doc ?? null);
  protected readonly failed = computed(() => this.result()?.failed ?? false);
  protected readonly groups = computed(() => {
    const doc = this.doc();
    return doc ? operationsByTag(doc) : [];
  });
}
