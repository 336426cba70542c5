import { HttpClient } from '@angular/common/http';
import { Injectable, computed, inject, signal } from '@angular/core';
import { firstValueFrom } from 'rxjs';
import { inNextTask } from '../routing/in-next-task';
import type { Role, User } from './user';

/**
 * The user's shape check, loaded beside the first request: it brings the schema library, which the first
 * script would otherwise have to carry and evaluate before the app can start.
 */
const userCheck = () => import('./user-check').then((m) => m.isUser);

/** Who is signed in. The one source of that truth in the browser. */
@Injectable({ providedIn: 'root' })
export class AuthService {
  private readonly http = inject(HttpClient);
  private readonly user = signal<User | null>(null);

  readonly currentUser = this.user.asReadonly();
  readonly signedIn = computed(() => this.user() !== null);

  hasRole(...roles: Role[]): boolean {
    const user = this.user();
    return !!user && roles.includes(user.role);
  }

  /**
   * Ask the server who we are; a 401 simply means nobody. At the app's start the check is handed over in
   * the next task, so the app starts after, not in, the task that evaluated the schema library.
   */
  async refresh(): Promise<User | null> {
    try {
      const [me, isUser] = await Promise.all([
        firstValueFrom(this.http.get<unknown>('/api/auth/me')),
        userCheck().then(inNextTask),
      ]);
      this.user.set(isUser(me) ? me : null);
    } catch {
      this.user.set(null);
    }
    return this.user();
  }

  async signIn(email: string, password: string): Promise<User> {
    const [me, isUser] = await Promise.all([
      firstValueFrom(this.http.post<unknown>('/api/auth/login', { email, password })),
      userCheck(),
    ]);
    if (!isUser(me)) throw new Error('The server answered sign-in with an unexpected shape.');
    this.user.set(me);
    return me;
  }

  async signOut(): Promise<void> {
    try {
      await firstValueFrom(this.http.post('/api/auth/logout', {}));
    } finally {
      this.user.set(null);
    }
  }

  /** Forget the user locally (the server already did, e.g. after a 401). */
  clear(): void {
    this.user.set(null);
  }
}
