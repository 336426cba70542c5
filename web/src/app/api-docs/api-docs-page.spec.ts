import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed } from '@angular/core/testing';
import { ApiDocsPage, operationsByTag } from './api-docs-page';

const DOC = {
  info: { title: 'Equilight API', version: '0.1.0', description: 'About the API' },
  paths: {
    '/api/batches': {
      get: {
        tags: ['batches'],
        summary: 'List batches',
        description: 'Roles: admin.',
        responses: { '200': { description: 'Batches' } },
      },
      post: {
        tags: ['batches'],
        summary: 'Create a batch',
        requestBody: { content: { 'application/json': { schema: { type: 'object', required: ['name'] } } } },
        responses: { '201': { description: 'The batch' } },
      },
    },
    '/api/health': {
      get: { tags: ['system'], summary: 'Liveness', responses: { '200': { description: 'Up' } } },
    },
  },
};

describe('ApiDocsPage', () => {
  it('groups operations by tag, in document order', () => {
    const groups = operationsByTag(DOC);
    expect(groups.map((g) => g.tag)).toEqual(['batches', 'system']);
    expect(groups[0].operations.map((o) => `${o.method} ${o.path}`)).toEqual([
      'GET /api/batches',
      'POST /api/batches',
    ]);
    expect(groups[0].operations[1].body[0].contentType).toBe('application/json');
    expect(groups[0].operations[1].success).toBe('201 The batch');
  });

  it('renders every operation from the served document', async () => {
    TestBed.configureTestingModule({
      imports: [ApiDocsPage],
      providers: [provideHttpClient(), provideHttpClientTesting()],
    });
    const fixture = TestBed.createComponent(ApiDocsPage);
    fixture.detectChanges();
    TestBed.inject(HttpTestingController).expectOne('/api/openapi.json').flush(DOC);
    await fixture.whenStable();
    const text = (fixture.nativeElement as HTMLElement).textContent ?? '';
    expect(text).toContain('/api/batches');
    expect(text).toContain('Create a batch');
    expect(text).toContain('Liveness');
  });
});
