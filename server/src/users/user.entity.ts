import { Column, CreateDateColumn, Entity, PrimaryGeneratedColumn, UpdateDateColumn } from 'typeorm';

import type { Role } from '../contracts/roles';
import type { PublicUser } from '../contracts/users';

export { ROLES, type Role } from '../contracts/roles';

@Entity('users')
export class User {
  @PrimaryGeneratedColumn('increment')
  id!: number;

  /** Stored lower-case; unique. */
  @Column('varchar', { length: 254, unique: true })
  email!: string;

  @Column('varchar', { name: 'display_name', length: 120 })
  displayName!: string;

  @Column('varchar', { length: 20 })
  role!: Role;

  /** bcrypt hash; null until an invited person sets a password. */
  @Column('varchar', { name: 'password_hash', length: 100, nullable: true })
  passwordHash!: string | null;

  @Column('boolean', { default: true })
  active!: boolean;

  /** SHA-256 of a one-time set-password token (invitation or reset); null when none is pending. */
  @Column('varchar', { name: 'set_password_token_hash', length: 64, nullable: true })
  setPasswordTokenHash!: string | null;

  @Column('bigint', { name: 'set_password_expires_at', nullable: true })
  setPasswordExpiresAt!: number | null;

  @CreateDateColumn({ name: 'created_at' })
  createdAt!: Date;

  @UpdateDateColumn({ name: 'updated_at' })
  updatedAt!: Date;
}

/** What the API shows of a person: never the hash or token. */
export type { PublicUser } from '../contracts/users';

export function toPublicUser(user: User): PublicUser {
  return {
    id: user.id,
    email: user.email,
    displayName: user.displayName,
    role: user.role,
    active: user.active,
    invited: user.passwordHash === null,
  };
}
