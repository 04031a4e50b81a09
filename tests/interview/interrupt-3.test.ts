/** Part 3 of the interruption test: see interrupt-parts.ts. */
import { interruptPart } from './interrupt-parts.js';

interruptPart(2);
