import { AuditEvent } from './audit-event.entity.js';
import { Invitation } from './invitation.entity.js';
import { Organization } from './organization.entity.js';
import { RobotToken } from './robot-token.entity.js';
import { Robot } from './robot.entity.js';
import { Session } from './session.entity.js';
import { Site } from './site.entity.js';
import { User } from './user.entity.js';

export { AuditEvent, Invitation, Organization, Robot, RobotToken, Session, Site, User };

/** Every entity class, passed to the DataSource as classes (not globs). */
export const entities = [Organization, User, Session, Invitation, Site, Robot, RobotToken, AuditEvent];
