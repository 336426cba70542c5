import { HttpClient } from '@angular/common/http';
import { Injectable, inject } from '@angular/core';
import { type Observable, map } from 'rxjs';
import { type Role, type User, isUser } from '../core/auth/user';

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

function checkUser(value: unknown): User {
  if (!isUser(value)) throw new Error('The server answered with an unexpected person record.');
  return value;
}

/** The /api/users resource. */
@Injectable({ providedIn: 'root' })
export class PeopleService {
  private readonly http = inject(HttpClient);

  list(): Observable<User[]> {
    return this.http.get<unknown[]>('/api/users').pipe(map((rows) => rows.map(checkUser)));
  }

  create(person: NewPerson): Observable<CreatedPerson> {
    return this.http
      .post<{ user: unknown; setPasswordUrl?: string }>('/api/users', person)
      .pipe(map((res) => ({ user: checkUser(res.user), setPasswordUrl: res.setPasswordUrl })));
  }

  update(id: number, changes: PersonChanges): Observable<User> {
    return this.http.patch<unknown>(`/api/users/${id}`, changes).pipe(map(checkUser));
  }
}
