// Karma for the Angular component specs (src/**/*.spec.ts), run by `ng test --watch=false`.
// Chromium from Debian (/usr/bin/chromium, or CHROME_BIN). As root Chromium needs --no-sandbox.
module.exports = function (config) {
  config.set({
    basePath: '',
    frameworks: ['jasmine'],
    plugins: [require('karma-jasmine'), require('karma-chrome-launcher')],
    client: {
      clearContext: true,
      jasmine: {
        random: true,
      },
    },
    reporters: ['progress'],
    browsers: ['ChromiumHeadlessCI'],
    customLaunchers: {
      ChromiumHeadlessCI: {
        base: 'ChromiumHeadless',
        flags: [
          '--no-sandbox',
          '--disable-gpu',
          '--disable-dev-shm-usage',
          '--disable-background-networking',
          '--disable-component-update',
          '--disable-sync',
          '--disable-quic',
          '--no-first-run',
        ],
      },
    },
    browserNoActivityTimeout: 120000,
    captureTimeout: 120000,
    singleRun: true,
    autoWatch: false,
    restartOnFileChange: false,
  });
};
