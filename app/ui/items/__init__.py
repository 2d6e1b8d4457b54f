"""Graphics items of the plan view: one group per scene layer, vertex handles, overlays."""
