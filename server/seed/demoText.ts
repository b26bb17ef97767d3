/**
 * What the demo's people wrote, per defect type: the inspector's note when logging, the
 * subcontractor's fix note, and the inspector's reason when a fix is sent back. Each defect type
 * has its own sentences so a returned drain fix never reads like a wiring problem. All invented.
 *
 * The demo companies log findings only under these codes (DEMO_CODES_BY_COMPANY); the seed test
 * checks every seeded note, fix note and return reason against its defect type's set here.
 */

export interface DefectText {
  notes: readonly string[];
  fixes: readonly string[];
  returns: readonly string[];
}

export const DEMO_DEFECT_TEXT: Readonly<Record<string, DefectText>> = {
  'MT-02': {
    notes: [
      'Single nut under the bracket at the return-air corner; no washer.',
      'Top nut missing on the rear hanger rod; the bracket rides on the lower nut only.',
      'Washer missing above the front-left bracket.',
    ],
    fixes: [
      'Added a washer and nut above and below all four brackets and tightened them together.',
      'Fitted the missing top nut and washer on the rear rod; checked the other three.',
      'Fitted washers above and below each bracket; nuts run up tight.',
    ],
    returns: [
      'Rear-right bracket still has a single nut; the photo shows a different corner.',
      'Washers fitted but the top nuts are not run down to the bracket.',
      'Nut and washer added on one rod only; the finding is for all four.',
    ],
  },
  'MT-05': {
    notes: [
      'Unit falls toward the piping side; the bubble is well off centre.',
      'Unit body out of level front to back; the drain end sits high.',
      'Unit hangs low at the drain end instead of level.',
    ],
    fixes: [
      'Re-levelled on the hanger nuts in both directions; level shown in the photo.',
      'Adjusted all four rods; level across the body and along it.',
      'Lowered the high corner and locked the nuts; checked with a level on the body.',
    ],
    returns: [
      'Level side to side now, but it still falls front to back.',
      'The photo shows the level on the panel, not on the unit body.',
      'Nuts not locked after levelling; the unit moved when the panel went on.',
    ],
  },
  'DR-01': {
    notes: [
      'Drain runs dead flat for the first few feet from the unit.',
      'Drain rises at the coupling over the corridor door.',
      'Slope lost where the drain crosses the duct.',
    ],
    fixes: [
      'Re-hung the drain with a steady fall from the unit to the riser.',
      'Lowered the coupling and re-set the hangers for a continuous fall.',
      'Re-routed below the duct so the fall is kept over the whole run.',
    ],
    returns: [
      'Still flat over the duct crossing; water stands after the test fill.',
      'Slope fixed near the unit but a belly remains by the riser.',
      'No photo along the run; show the fall from the unit to the riser.',
    ],
  },
  'DR-02': {
    notes: [
      'Drain sags between the second and third hanger.',
      'Only one support on the whole horizontal run.',
      'Drain hangs from the line-set strap instead of its own hanger.',
    ],
    fixes: [
      'Added a hanger at mid-span and re-set the run.',
      'Added supports along the run at the spacing of the code table.',
      'Gave the drain its own hangers, apart from the line set.',
    ],
    returns: [
      'New hanger added but the sag is still there past the elbow.',
      'Supports added on the near half of the run only.',
      'Drain still tied to the line-set strap at the far end.',
    ],
  },
  'DR-07': {
    notes: [
      'Field trap fitted under the unit; its manual says this drain runs without a trap and a check valve is already in.',
      'Trap added at the unit outlet where the manual shows a check valve only; the drain gurgles when the pump runs.',
      'Second trap fitted on the pump discharge; the manual shows the discharge with a check valve, no trap.',
    ],
    fixes: [
      'Removed the field trap as the manual shows; the check valve stays, and the drain falls all the way.',
      'Took out the trap and fitted the in-line check valve the manual names.',
      'Removed the trap on the pump discharge; the check valve already on it is kept.',
    ],
    returns: [
      'Trap removed, but the check valve went with it: the drain now has neither.',
      'Check valve fitted the wrong way round; the arrow points at the unit.',
      'Trap removed on the unit next door; this one still has it.',
    ],
  },
  'PG-01': {
    notes: [
      'Panel corner hangs open; daylight shows at the gasket.',
      'Panel sits proud of the ceiling on the corridor side.',
      'Panel twisted against the grid; the louvre catches when it swings.',
    ],
    fixes: [
      'Re-seated the panel on its hooks and drew it up evenly at all corners.',
      'Trimmed the tile edge so the panel sits flush with the ceiling.',
      'Squared the panel to the body and tightened the corner screws.',
    ],
    returns: [
      'Still a gap at one corner when the unit runs.',
      'Panel flush now but the louvre still catches on one side.',
      'Corner screws left loose; the panel moved when touched.',
    ],
  },
  'RP-04': {
    notes: [
      'Insulation split at the elbow above the corridor door.',
      'Gap at the flare joint; bare copper showing.',
      'Seams on the suction line left open, not taped.',
    ],
    fixes: [
      'Replaced the split section and taped every seam.',
      'Insulated the flare joints with fitted covers and taped the ends.',
      'Glued and taped every seam along the run.',
    ],
    returns: [
      'The new section is not taped at the upper seam.',
      'Flare covers fitted at the unit but not at the branch joint.',
      'Copper still bare where the line enters the unit.',
    ],
  },
  'SN-03': {
    notes: [
      'Remote sensor fitted beside the supply grille.',
      'Sensor on an outside wall in direct sun.',
      'Sensor behind a door that stands open all day.',
    ],
    fixes: [
      'Moved the sensor to the inner wall, away from the supply air.',
      'Moved it to an inside wall and patched the old opening.',
      'Moved the sensor to the wall beside the light switch.',
    ],
    returns: [
      'Sensor moved, but the old hole is left open.',
      'The new spot is still in the supply air stream.',
      'Sensor mounted but not connected; the controller shows no reading.',
    ],
  },
  'LB-01': {
    notes: ['No tag on the unit.', 'The tag on the unit does not match the drawings.', 'Tag written by hand on tape and half peeled off.'],
    fixes: [
      'Fitted the printed tag where it can be read from below.',
      'Replaced the wrong tag with the one from the unit schedule.',
      'Fitted a printed tag and removed the tape.',
    ],
    returns: [
      'Tag fitted above the ceiling where nobody can read it.',
      'The new tag still shows the old number.',
      'Tag fitted on the panel, which comes off for service; fix it to the unit.',
    ],
  },
  'EL-03': {
    notes: [
      'Supply conductor loose at the unit terminal block.',
      'No torque marks on the power terminals.',
      'Ground screw backed out at the terminal block.',
    ],
    fixes: [
      'Re-terminated and torqued to the value on the unit label; marked each screw.',
      'Torqued the power terminals and added torque marks.',
      'Re-made the ground connection and torqued it.',
    ],
    returns: [
      'Torque marks added but one screw still turns by hand.',
      'The photo does not show the terminal block; the cover was on.',
      'Supply tight now, but the ground screw is still loose.',
    ],
  },
  'EL-04': {
    notes: [
      'Power cable enters the unit with no connector or clamp.',
      'Communication cable pulled tight across the box edge.',
      'Connector fitted but not tightened on the cable.',
    ],
    fixes: [
      'Fitted a cable connector and tightened it on the jacket.',
      'Re-routed the cable with slack and clamped it at the entry.',
      'Tightened the connector; the cable cannot pull through.',
    ],
    returns: [
      'Connector clamps the wires inside the jacket, not the jacket.',
      'Clamp fitted but the cable still rubs on the box edge.',
      'Power cable done; the communication cable still has no relief.',
    ],
  },
  'EL-05': {
    notes: [
      'Communication cable tied to the power cable for the whole run.',
      'Both cables share one entry into the unit.',
      'Communication cable laid on top of the power cable in the tray.',
    ],
    fixes: [
      'Separated the cables and ran the communication cable on its own supports.',
      'Brought the communication cable in through its own entry.',
      'Moved the communication cable to the other side of the tray.',
    ],
    returns: [
      'Separated in the ceiling but tied together again at the unit.',
      'Own entry made but left without a bushing.',
      'Still crosses the power cable at the last bend.',
    ],
  },
  'EL-08': {
    notes: ['Cover off the unit electrical box.', 'Junction box above the unit left without its lid.', 'Knock-out left open in the side of the box.'],
    fixes: ['Fitted the cover and all its screws.', 'Fitted the lid on the junction box.', 'Closed the open knock-out with a plug.'],
    returns: [
      'Cover fitted with one screw only.',
      'Lid fitted, but a second box on the same run is still open.',
      'Plug fitted in the wrong opening; the knock-out is still open.',
    ],
  },
  'LB-03': {
    notes: [
      'Disconnect has no label naming the unit it serves.',
      'The label on the disconnect names the wrong unit.',
      'Label handwritten and already faded.',
    ],
    fixes: [
      'Fitted a printed label with the unit tag and panel circuit.',
      'Replaced the label with the right unit tag.',
      'Fitted a printed label in place of the handwritten one.',
    ],
    returns: [
      'Label names the unit but not the panel circuit.',
      'Label fitted on the wrong disconnect of the pair.',
      'Label peeling off already; it needs a fixed label.',
    ],
  },
  'CL-04': {
    notes: [
      'Main runner of the grid crosses right below the service side.',
      'Light fitting placed against the service side.',
      'Bulkhead framing closes off the service side.',
    ],
    fixes: ['Moved the grid runner clear of the service side.', 'Moved the light fitting one tile over.', 'Cut back the bulkhead framing and finished the edge.'],
    returns: [
      'Runner moved, but a cross tee still blocks the panel.',
      'Light moved but its cable still hangs across the opening.',
      'Framing cut back but the board edge is left raw.',
    ],
  },
  'CL-05': {
    notes: [
      'No access panel below the unit in the hard ceiling.',
      'Access panel on the wrong side of the unit, away from the service side.',
      'Access panel too small to reach the pump.',
    ],
    fixes: [
      'Cut in an access panel below the service side of the unit.',
      'Moved the access panel to the service side and patched the old opening.',
      'Fitted a larger access panel; the pump can be reached and lifted out.',
    ],
    returns: ['Panel fitted but the drain is still out of reach.', 'The old opening is not patched yet.', 'Panel fitted below the wrong unit.'],
  },
  'PN-02': {
    notes: [
      'Line-set penetration not sealed at the wall.',
      'Gap around the drain where it passes the partition.',
      'Opening cut oversize and left open beside the pipes.',
    ],
    fixes: [
      'Sealed the penetration all round with the specified sealant.',
      'Packed and sealed the gap around the drain.',
      'Patched the oversize opening and sealed around the pipes.',
    ],
    returns: ['Sealed on the room side only.', 'Sealant already cracked away from the pipe.', 'Patch fitted but the gap at the top is still open.'],
  },
};

/** Which defect types each demo subcontractor's findings are logged under. */
export const DEMO_CODES_BY_COMPANY = {
  mechanical: ['MT-02', 'MT-05', 'DR-01', 'DR-02', 'DR-07', 'PG-01', 'RP-04', 'SN-03', 'LB-01'],
  electrical: ['EL-03', 'EL-04', 'EL-05', 'EL-08', 'LB-03'],
  ceilings: ['CL-04', 'CL-05', 'PN-02'],
} as const;

/** The one "Something else" finding: a defect the catalogue does not list, with its own title. */
export const DEMO_SOMETHING_ELSE = {
  title: 'Protective film left on the louvres',
  note: 'Shipping film still on the louvres; the unit runs against it.',
  fix: 'Peeled the film off all four louvres and wiped the panel.',
} as const;
