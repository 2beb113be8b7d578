#!/usr/bin/env node
/**
 * The `motorprint` command, for those who install the `motorprint` package: the same executable as
 * `@motorprint/cli`'s (`npx motorprint --help`).
 */
import '@motorprint/cli/main';
