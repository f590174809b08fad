import { AgreementBlocks } from './agreement-blocks.entity.js';
import { AuditEvent } from './audit-event.entity.js';
import { DailyStat } from './daily-stat.entity.js';
import { EvidenceChunk } from './evidence-chunk.entity.js';
import { HourlyTraffic } from './hourly-traffic.entity.js';
import { MapVersion } from './map-version.entity.js';
import { ScanBatch } from './scan-batch.entity.js';
import { ScanSample } from './scan-sample.entity.js';
import { Invitation } from './invitation.entity.js';
import { JobRun } from './job-run.entity.js';
import { Organization } from './organization.entity.js';
import { PoseTrail } from './pose-trail.entity.js';
import { RemapRequest, RemapRequestZone } from './remap-request.entity.js';
import { RobotFlag } from './robot-flag.entity.js';
import { RobotToken } from './robot-token.entity.js';
import { Robot } from './robot.entity.js';
import { Session } from './session.entity.js';
import { Site } from './site.entity.js';
import { User } from './user.entity.js';
import { Zone } from './zone.entity.js';
import { DockingBatch } from './docking-batch.entity.js';
import { DockingResult } from './docking-result.entity.js';
import { DockingStation } from './docking-station.entity.js';
import { CapturedMail } from './captured-mail.entity.js';
import { OutgoingMail } from './outgoing-mail.entity.js';
import { MonthlyReport } from './monthly-report.entity.js';
import { Recipient } from './recipient.entity.js';
import { PasswordResetToken } from './password-reset-token.entity.js';

export { AgreementBlocks, AuditEvent, DailyStat, EvidenceChunk, HourlyTraffic, Invitation, JobRun, MapVersion, Organization, PoseTrail, RemapRequest, RemapRequestZone, Robot, RobotFlag, RobotToken, ScanBatch, ScanSample, Session, Site, User, Zone };
export { DockingBatch, DockingResult, DockingStation };
export { CapturedMail, OutgoingMail };
export { MonthlyReport, Recipient };
export { PasswordResetToken };

/** Every entity class, passed to the DataSource as classes (not globs). */
export const entities = [Organization, User, Session, Invitation, Site, Robot, RobotToken, AuditEvent, MapVersion, ScanBatch, EvidenceChunk, DailyStat, AgreementBlocks, ScanSample, Zone, RobotFlag, JobRun, PoseTrail, HourlyTraffic, DockingStation, DockingBatch, DockingResult, RemapRequest, RemapRequestZone, OutgoingMail, CapturedMail, Recipient, MonthlyReport, PasswordResetToken];
