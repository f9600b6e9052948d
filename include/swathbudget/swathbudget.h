/* swathbudget — the whole public interface of libswathbudget. */
#ifndef SWATHBUDGET_H
#define SWATHBUDGET_H

#include "swathbudget/error.h"
#include "swathbudget/units.h"
#include "swathbudget/ydoc.h"
#include "swathbudget/orders.h"
#include "swathbudget/horiz95.h"
#include "swathbudget/raytrace.h"
#include "swathbudget/soundspeed.h"
#include "swathbudget/profile.h"
#include "swathbudget/decimal.h"
#include "swathbudget/csvread.h"
#include "swathbudget/grid.h"
#include "swathbudget/tvutable.h"
#include "swathbudget/audit.h"
#include "swathbudget/simulate.h"
#include "swathbudget/system.h"
#include "swathbudget/spec.h"
#include "swathbudget/georef.h"
#include "swathbudget/refraction.h"
#include "swathbudget/propagate.h"
#include "swathbudget/swath.h"
#include "swathbudget/montecarlo.h"
#include "swathbudget/density.h"
#include "swathbudget/area.h"
#include "swathbudget/effort.h"
#include "swathbudget/svg.h"
#include "swathbudget/html.h"
#include "swathbudget/writer.h"

#endif
