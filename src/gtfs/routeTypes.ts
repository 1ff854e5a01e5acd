// The family of a GTFS route_type (the basic types 0-12 and the extended 100-1700 ones): which kind of
// vehicle runs the route, for the speed limits of the feed checks and the cruise speeds of the model.

/** Speed families by GTFS route_type (basic 0-12 and the extended 100-1700 types). */
export type SpeedFamily = 'bus' | 'tram' | 'metro' | 'rail' | 'ferry' | 'cable' | 'other';

/** The speed family of a GTFS route_type. */
export function speedFamily(routeType: number): SpeedFamily {
  switch (routeType) {
    case 0:
    case 5:
      return 'tram';
    case 1:
    case 12:
      return 'metro';
    case 2:
      return 'rail';
    case 3:
    case 11:
      return 'bus';
    case 4:
      return 'ferry';
    case 6:
    case 7:
      return 'cable';
  }
  if (routeType >= 100 && routeType < 200) return 'rail';
  if (routeType >= 200 && routeType < 300) return 'bus'; // coach
  if (routeType >= 400 && routeType < 500) return 'metro';
  if (routeType >= 700 && routeType < 900) return 'bus'; // bus, trolleybus
  if (routeType >= 900 && routeType < 1000) return 'tram';
  if (routeType >= 1000 && routeType < 1100) return 'ferry';
  if (routeType === 1200) return 'ferry';
  if (routeType >= 1300 && routeType < 1500) return 'cable';
  return 'other';
}
