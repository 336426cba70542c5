import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { createdUserSchema, publicUserSchema } from '@equilight/contracts';
import type { Observable } from 'rxjs';
import { parsed } from '../core/http/api-response';
import type { Role, User } from '../core/auth/user';

export interface NewPerson {
  email: string;
  displayName: string;
  role: Role;
  password?: string;
}

export interface CreatedPerson {
  user: User;
  setPasswordUrl?: string;
}

export type PersonChanges = Partial<Pick<User, 'displayName' | 'role' | 'active'>>;

const person = parsed(publicUserSchema, 'person record');

/** The /api/users resource. */
@Injectable({ providedIn: 'root' })
export class PeopleService {
  private readonly http = inject(HttpClient);

  list(): Observable<User[]> {
    return this.http.get<unknown>('/api/users').pipe(parsed(publicUserSchema.array(), 'list of people'));
  }

  create(person: NewPerson): Observable<CreatedPerson> {
    return this.http.post<unknown>('/api/users', person).pipe(parsed(createdUserSchema, 'new person'));
  }

  update(id: number, changes: PersonChanges): Observable<User> {
    return this.http.patch<unknown>(`/api/users/${id}`, changes).pipe(person);
  }
}
