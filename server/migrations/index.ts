import { Foundation1796170942239 } from './1796170942239-Foundation.js';
import { MapsAndEvidence1796172603219 } from './1796172603219-MapsAndEvidence.js';
import { MapHealth1796172987767 } from './1796172987767-MapHealth.js';
import { PoseTrails1796180812700 } from './1796180812700-PoseTrails.js';
import { HourlyTraffic1796183000000 } from './1796183000000-HourlyTraffic.js';
import { RemapRequests1796185100000 } from './1796185100000-RemapRequests.js';
import { DockingStations1796190000000 } from './1796190000000-DockingStations.js';
import { Mail1796200000000 } from './1796200000000-Mail.js';
import { MonthlyReports1796210000000 } from './1796210000000-MonthlyReports.js';
import { PasswordResets1796220000000 } from './1796220000000-PasswordResets.js';
import { MailHeaders1796221000000 } from './1796221000000-MailHeaders.js';

/** Every migration class in order; new ones are appended here. */
export const migrations: Function[] = [Foundation1796170942239, MapsAndEvidence1796172603219, MapHealth1796172987767, PoseTrails1796180812700, HourlyTraffic1796183000000, RemapRequests1796185100000, DockingStations1796190000000, Mail1796200000000, MonthlyReports1796210000000, PasswordResets1796220000000, MailHeaders1796221000000];
