// Piscina worker entry. Plain CommonJS so it loads in any runner (tsx for `npm start`, Jest, bare
// node): tsx's require hook is registered first, then the TypeScript worker module is required.
// ts-jest's transform does not reach worker threads, hence this bootstrap.
'use strict';
require('tsx/cjs/api').register();
module.exports = require('./calibrationWorker.ts');
