import type { NextFunction, Request, Response } from 'express';
import type { Robot } from '../entities/index.js';
import { HttpError } from '../http-error.js';
import type { RobotsService } from '../services/robots.service.js';

/** Authenticates a robot by its bearer token; sets `res.locals.robot`. */
export function robotToken(robots: RobotsService) {
  return async (req: Request, res: Response, next: NextFunction) => {
    const header = req.get('authorization') ?? '';
    const match = /^Bearer\s+(\S+)$/i.exec(header);
    if (!match) throw new HttpError(401, 'invalid_token', 'Send the robot token as "Authorization: Bearer <token>".');
    res.locals.robot = await robots.robotForToken(match[1]);
    next();
  };
}

/** The robot of a request that passed `robotToken`. */
export const robotOf = (res: Response): Robot => res.locals.robot as Robot;
