#!/usr/bin/env node
// Entry of the twinfet command line; the program itself is built to ../dist.
import { main } from '../dist/main.js';

process.exitCode = await main(process.argv.slice(2));
