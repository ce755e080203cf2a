/**
 * TypeORM entities for the foundation tables. The schema itself is owned by the migrations in
 * server/migrations (synchronize is off); these classes only map rows. Column names follow the
 * snake_case naming strategy set on the DataSource. Types are spelled out on every column because
 * the TypeScript runners used here do not emit decorator metadata.
 */
import { Column, Entity, PrimaryColumn } from 'typeorm';
import type { Role } from '../../shared/schemas';

@Entity('teams')
export class Team {
  @PrimaryColumn({ type: 'uuid' }) id: string;
  @Column({ type: 'text' }) name: string;
  @Column({ type: 'timestamptz', insert: false, update: false }) createdAt: Date;
}

@Entity('users')
export class User {
  @PrimaryColumn({ type: 'uuid' }) id: string;
  @Column({ type: 'text' }) email: string;
  @Column({ type: 'text' }) passwordHash: string;
  @Column({ type: 'text' }) displayName: string;
  @Column({ type: 'timestamptz', insert: false, update: false }) createdAt: Date;
  @Column({ type: 'timestamptz', insert: false }) updatedAt: Date;
}

@Entity('skater_groups')
export class SkaterGroup {
  @PrimaryColumn({ type: 'uuid' }) teamId: string;
  @PrimaryColumn({ type: 'uuid' }) id: string;
  @Column({ type: 'text' }) name: string;
  @Column({ type: 'integer' }) sortOrder: number;
}

@Entity('skaters')
export class Skater {
  @PrimaryColumn({ type: 'uuid' }) teamId: string;
  @PrimaryColumn({ type: 'uuid' }) id: string;
  @Column({ type: 'text' }) displayName: string;
  @Column({ type: 'uuid', nullable: true }) groupId: string | null;
  @Column({ type: 'uuid', nullable: true }) userId: string | null;
  @Column({ type: 'timestamptz', nullable: true }) retiredAt: Date | null;
}

@Entity('memberships')
export class Membership {
  @PrimaryColumn({ type: 'uuid' }) teamId: string;
  @PrimaryColumn({ type: 'uuid' }) userId: string;
  @Column({ type: 'text' }) role: Role;
  @Column({ type: 'uuid', nullable: true }) skaterId: string | null;
}

@Entity('invitations')
export class Invitation {
  @PrimaryColumn({ type: 'uuid' }) teamId: string;
  @PrimaryColumn({ type: 'uuid' }) id: string;
  @Column({ type: 'text' }) email: string;
  @Column({ type: 'text' }) role: 'coach' | 'skater' | 'guardian';
  @Column({ type: 'uuid', nullable: true }) skaterId: string | null;
  @Column({ type: 'text' }) tokenHash: string;
  @Column({ type: 'uuid' }) invitedBy: string;
  @Column({ type: 'timestamptz' }) expiresAt: Date;
  @Column({ type: 'timestamptz', nullable: true }) acceptedAt: Date | null;
  @Column({ type: 'timestamptz', nullable: true }) revokedAt: Date | null;
  @Column({ type: 'timestamptz', insert: false, update: false }) createdAt: Date;
}

@Entity('refresh_tokens')
export class RefreshToken {
  @PrimaryColumn({ type: 'uuid' }) id: string;
  @Column({ type: 'uuid' }) userId: string;
  @Column({ type: 'uuid' }) familyId: string;
  @Column({ type: 'text' }) tokenHash: string;
  @Column({ type: 'timestamptz' }) expiresAt: Date;
  @Column({ type: 'timestamptz', nullable: true }) usedAt: Date | null;
  @Column({ type: 'timestamptz', nullable: true }) revokedAt: Date | null;
}

/** One sign-in: its refresh tokens rotate within it, and its access tokens name it (`sid`). */
@Entity('token_families')
export class TokenFamily {
  @PrimaryColumn({ type: 'uuid' }) id: string;
  @Column({ type: 'uuid' }) userId: string;
  @Column({ type: 'timestamptz', insert: false, update: false }) createdAt: Date;
  @Column({ type: 'timestamptz', nullable: true }) revokedAt: Date | null;
}

@Entity('password_resets')
export class PasswordReset {
  @PrimaryColumn({ type: 'uuid' }) id: string;
  @Column({ type: 'uuid' }) userId: string;
  @Column({ type: 'text' }) tokenHash: string;
  @Column({ type: 'timestamptz' }) expiresAt: Date;
  @Column({ type: 'timestamptz', nullable: true }) usedAt: Date | null;
}

export const entities = [Team, User, SkaterGroup, Skater, Membership, Invitation, RefreshToken, TokenFamily, PasswordReset];
