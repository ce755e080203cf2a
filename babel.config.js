/** Babel for the Expo client (app/, components/, store/, sync/, shared/); the server uses tsx/ts-jest instead. */
module.exports = function (api) {
  api.cache(true);
  return { presets: ['babel-preset-expo'] };
};
