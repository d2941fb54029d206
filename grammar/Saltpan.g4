// Saltpan.g4 - the grammar of saltpan specs. Generated into the build tree at build time;
// only compiler/parse/ sees the generated types.
grammar Saltpan;

spec : item* EOF ;

item
  : modelHeader
  | useDecl
  | temperatureDecl
  | ionDecl
  | constDecl
  | fnDecl
  | outsideDecl
  | compartmentDecl
  | cableDecl
  | channelDecl
  | pumpDecl
  | protocolDecl
  | expectDecl
  | sweepDecl
  | ';'
  ;

// model NAME "title"
modelHeader : MODEL IDENT STRING? ;
// use std.ions | use "file.saltpan"
useDecl : USE (modulePath | STRING) ;
modulePath : IDENT ('.' word)* ;
// Any name-like token: module paths may contain words that are keywords elsewhere.
word : IDENT | MODEL | USE | TEMPERATURE | ION | VALENCE | CONST | FN | OUTSIDE | INSIDE | IMPERMEANT
     | COMPARTMENT | SPHERE | CYLINDER | DIAMETER | LENGTH | AREA | CAPACITANCE | INITIAL | MEMBRANE
     | CHANNEL | CARRIES | REVERSAL | GATE | POWER | OPENING | CLOSING | STEADY | TAU | Q10 | AT | PUMP
     | EXCHANGER | CYCLE | ACTIVITY | IN | OUT | IF | THEN | ELSE | AND | OR | NOT
     | PROTOCOL | METHOD | STEP | TOLERANCE | DURATION | INJECT | RAMP | PULSES | WIDTH | EVERY | FROM | TO
     | RECORD | CLAMP | SYNAPSE | RISE | DECAY | PEAK | DYNAMIC | SHELL | EXPECT | WITHIN | RELATIVE | SOURCE
     | SWEEP | VARY | POINTS | LOGARITHMIC | VALUES | SAMPLE | LATIN_HYPERCUBE | UNIFORM | SEED | MEASURE
     | CABLE | GROWS | END | AXIAL | RESISTIVITY | PIECES | PIECE | PER | CONSTANT ;
// temperature 37 degC
temperatureDecl : TEMPERATURE expr ;
// ion Na valence +1
ionDecl : ION IDENT VALENCE signedNumber ;
signedNumber : sign=('+' | '-')? NUMBER ;
// const NAME (: unit)? = expr
constDecl : CONST IDENT (':' unitType)? '=' expr ;
// fn NAME(param: unit, ...) -> unit = expr
fnDecl : FN IDENT '(' (param (',' param)*)? ')' '->' unitType '=' expr ;
param : IDENT ':' unitType ;
unitType : unitTypeTerm ((('*' | SLASH | DOT) unitTypeTerm) | UNIT_MUL | UNIT_DIV)* ;
unitTypeTerm : NUMBER | IDENT UNIT_POW? | '(' unitType ')' ;

// outside NAME { [X] = c ... }
outsideDecl : OUTSIDE IDENT solutionBlock ;
solutionBlock : '{' solutionEntry* '}' ;
solutionEntry
  : '[' IDENT ']' '=' expr (DYNAMIC (SHELL expr)?)?   # concentrationEntry
  | IMPERMEANT expr VALENCE signedNumber   # impermeantEntry
  | ';'                             # emptySolutionEntry
  ;

compartmentDecl : COMPARTMENT IDENT '{' compartmentItem* '}' ;
compartmentItem
  : SPHERE DIAMETER expr                          # sphereItem
  | CYLINDER LENGTH expr DIAMETER expr            # cylinderItem
  | AREA expr                                     # areaItem
  | CAPACITANCE expr                              # capacitanceItem
  | INITIAL IDENT '=' expr                        # initialItem
  | OUTSIDE IDENT                                 # bathItem
  | INSIDE solutionBlock                          # insideItem
  | MEMBRANE '{' membraneEntry* '}'               # membraneItem
  | ';'                                           # emptyCompartmentItem
  ;
membraneEntry : IDENT expr (REVERSAL expr)? ';'? ;

// cable NAME { grows from PARENT [end | at POSITION]; length L; diameter D [to D2];
//              axial resistivity R; pieces N [per length constant at F] | piece length L;
//              compartment items }
cableDecl : CABLE IDENT '{' (cableItem | compartmentItem)* '}' ;
cableItem
  : GROWS FROM IDENT (END | position)?            # growsItem
  | LENGTH expr                                   # cableLengthItem
  | DIAMETER expr (TO expr)?                      # cableDiameterItem
  | AXIAL RESISTIVITY expr                        # axialItem
  | PIECES NUMBER (PER LENGTH CONSTANT AT expr)?   # piecesItem
  | PIECE LENGTH expr                             # pieceLengthItem
  ;

channelDecl : CHANNEL IDENT '{' channelItem* '}' ;
channelItem
  : CARRIES carried (',' carried)*                # carriesItem
  | REVERSAL expr                                 # reversalItem
  | GATE IDENT (POWER NUMBER)? '{' gateItem* '}'  # gateDecl
  | Q10 expr AT expr                              # q10Item
  | ';'                                           # emptyChannelItem
  ;
carried : IDENT NUMBER? ;
gateItem : rate=(OPENING | CLOSING | STEADY | TAU) '=' expr ';'? ;

pumpDecl : kind=(PUMP | EXCHANGER) IDENT '{' pumpItem* '}' ;
pumpItem
  : CYCLE stoichTerm (',' stoichTerm)*            # cycleItem
  | ACTIVITY '=' expr                             # activityItem
  | ';'                                           # emptyPumpItem
  ;
stoichTerm : NUMBER IDENT dir=(IN | OUT) ;

// expect [PROTOCOL:] MEASURE(ARGS) CHECK [source "..."]
expectDecl : EXPECT (IDENT ':')? word '(' (expectArg (',' expectArg)*)? ')' expectCheck (SOURCE STRING)? ;
expectArg : STRING | recordTarget position? | expr ;
expectCheck
  : '==' expr (WITHIN expr RELATIVE?)?            # equalCheck
  | IN expr TO expr                               # rangeCheck
  | op=('<' | '<=' | '>' | '>=') expr             # boundCheck
  ;

// sweep NAME { vary PARAM from A to B [points N] [logarithmic] | vary PARAM values A, B, ...;
//              sample N latin_hypercube|uniform seed S; measure [PROTOCOL:] MEASURE(ARGS) }
sweepDecl : SWEEP IDENT '{' sweepItem* '}' ;
sweepItem
  : VARY recordTarget FROM expr TO expr (POINTS NUMBER)? LOGARITHMIC?   # rangeVary
  | VARY recordTarget VALUES expr (',' expr)*                          # listVary
  | SAMPLE NUMBER design=(LATIN_HYPERCUBE | UNIFORM) SEED NUMBER        # sampleItem
  | MEASURE (IDENT ':')? word '(' (expectArg (',' expectArg)*)? ')'     # measureItem
  | ';'                                                                 # emptySweepItem
  ;
// protocol NAME { method ... step ...; duration ...; inject ...; record ... every ... }
// A clamp at a place along a cable gives its level after `to`: `clamp dend at 450 um to -65 mV`.
protocolDecl : PROTOCOL IDENT '{' protocolItem* '}' ;
protocolItem
  : METHOD IDENT (STEP expr)? (TOLERANCE expr)?   # methodItem
  | DURATION expr                                 # durationItem
  | INJECT IDENT position? injection              # injectItem
  | RECORD recorded (',' recorded)* (EVERY expr)? # recordItem
  | CLAMP IDENT (position TO | AT) expr (FROM expr TO expr)?   # clampItem
  | SYNAPSE IDENT position? expr REVERSAL expr synapseShape synapseTimes   # synapseItem
  | ';'                                           # emptyProtocolItem
  ;
injection
  : RAMP expr TO expr FROM expr TO expr                   # rampInjection
  | PULSES expr WIDTH expr EVERY expr FROM expr TO expr   # pulseInjection
  | expr FROM expr TO expr                                # stepInjection
  ;
recordTarget : word ('.' word)* ;
// Along a cable: a distance from its start (`at 450 um`) or a percentage of its length
// (`at 90 %`). A number and a unit it must have, never an expression: what follows a place (an
// amplitude) is an expression, and an optional unit would let its first name be read as one.
position : AT NUMBER (unit | PERCENT) ;
recorded : recordTarget position? ;
synapseShape
  : RISE expr DECAY expr                          # doubleExponential
  | DECAY expr                                    # singleExponential
  | PEAK expr                                     # alphaShape
  ;
synapseTimes
  : AT expr (',' expr)*                           # listedTimes
  | EVERY expr FROM expr TO expr                  # regularTimes
  ;

expr
  : IF expr THEN expr ELSE expr                   # ifExpr
  | orExpr                                        # plainExpr
  ;
orExpr : andExpr (OR andExpr)* ;
andExpr : notExpr (AND notExpr)* ;
notExpr : NOT notExpr | cmpExpr ;
cmpExpr : addExpr (op=('==' | '!=' | '<' | '<=' | '>' | '>=') addExpr)? ;
addExpr : mulExpr (ops+=('+' | '-') mulExpr)* ;
// "x/tau" lexes as x UNIT_DIV: division by a name written without spaces.
mulExpr : unaryExpr ((('*' | SLASH) unaryExpr) | UNIT_MUL | UNIT_DIV)* ;
unaryExpr : op=('-' | '+') unaryExpr | powExpr ;
powExpr : primary ('^' unaryExpr | UNIT_POW+ ('^' unaryExpr)?)? ;
primary
  : quantity                                      # quantityPrimary
  | IDENT '(' (expr (',' expr)*)? ')'             # callPrimary
  | IDENT                                         # namePrimary
  | '[' IDENT ']' side=(IN | OUT)                 # concentrationPrimary
  | '(' expr ')'                                  # parenPrimary
  ;

// quantity : NUMBER unit? ; a unit is written without spaces inside it, so the lexer
// already tells "/ms" (part of a unit) from " / " (division).
quantity : NUMBER unit? ;
unit : (IDENT UNIT_POW? | UNIT_DIV) (UNIT_MUL | UNIT_DIV)* ;

MODEL : 'model' ;
USE : 'use' ;
TEMPERATURE : 'temperature' ;
ION : 'ion' ;
VALENCE : 'valence' ;
CONST : 'const' ;
FN : 'fn' ;
OUTSIDE : 'outside' ;
INSIDE : 'inside' ;
IMPERMEANT : 'impermeant' ;
COMPARTMENT : 'compartment' ;
SPHERE : 'sphere' ;
CYLINDER : 'cylinder' ;
DIAMETER : 'diameter' ;
LENGTH : 'length' ;
AREA : 'area' ;
CAPACITANCE : 'capacitance' ;
INITIAL : 'initial' ;
MEMBRANE : 'membrane' ;
CHANNEL : 'channel' ;
CARRIES : 'carries' ;
REVERSAL : 'reversal' ;
GATE : 'gate' ;
POWER : 'power' ;
OPENING : 'opening' ;
CLOSING : 'closing' ;
STEADY : 'steady' ;
TAU : 'tau' ;
Q10 : 'q10' ;
AT : 'at' ;
PUMP : 'pump' ;
EXCHANGER : 'exchanger' ;
CYCLE : 'cycle' ;
ACTIVITY : 'activity' ;
IN : 'in' ;
OUT : 'out' ;
IF : 'if' ;
THEN : 'then' ;
ELSE : 'else' ;
AND : 'and' ;
OR : 'or' ;
NOT : 'not' ;
PROTOCOL : 'protocol' ;
METHOD : 'method' ;
STEP : 'step' ;
TOLERANCE : 'tolerance' ;
DURATION : 'duration' ;
INJECT : 'inject' ;
RAMP : 'ramp' ;
PULSES : 'pulses' ;
WIDTH : 'width' ;
EVERY : 'every' ;
FROM : 'from' ;
TO : 'to' ;
RECORD : 'record' ;
CLAMP : 'clamp' ;
SYNAPSE : 'synapse' ;
RISE : 'rise' ;
DECAY : 'decay' ;
PEAK : 'peak' ;
DYNAMIC : 'dynamic' ;
SHELL : 'shell' ;
EXPECT : 'expect' ;
WITHIN : 'within' ;
RELATIVE : 'relative' ;
SOURCE : 'source' ;
SWEEP : 'sweep' ;
VARY : 'vary' ;
POINTS : 'points' ;
LOGARITHMIC : 'logarithmic' ;
VALUES : 'values' ;
SAMPLE : 'sample' ;
LATIN_HYPERCUBE : 'latin_hypercube' ;
UNIFORM : 'uniform' ;
SEED : 'seed' ;
MEASURE : 'measure' ;
CABLE : 'cable' ;
GROWS : 'grows' ;
END : 'end' ;
AXIAL : 'axial' ;
RESISTIVITY : 'resistivity' ;
PIECES : 'pieces' ;
PIECE : 'piece' ;
PER : 'per' ;
CONSTANT : 'constant' ;

// An operator glued to a following unit word: "/ms", "*K", "/cm^2".
UNIT_DIV : '/' UNIT_WORD ;
UNIT_MUL : [*\u00B7] UNIT_WORD ;
UNIT_POW : '^' '-'? [0-9]+ ('.' [0-9]+)? ;
fragment UNIT_WORD : LETTER (LETTER | [0-9])* ('^' '-'? [0-9]+ ('.' [0-9]+)?)? ;
SLASH : '/' ;
PERCENT : '%' ;
DOT : [\u00B7] ;
NUMBER : DIGITS ('.' DIGITS?)? EXPONENT? | '.' DIGITS EXPONENT? ;
fragment DIGITS : [0-9]+ ;
fragment EXPONENT : [eE] [+-]? DIGITS ;
IDENT : LETTER (LETTER | [0-9])* ;
fragment LETTER : [a-zA-Z_] | '\u00B5' | '\u03BC' | '\u03A9' | '\u2126' | '\u00B0' ;
STRING : '"' (~["\\\r\n] | '\\' ~[\r\n])* '"' ;
UNTERMINATED_STRING : '"' (~["\\\r\n] | '\\' ~[\r\n])* ;
DOC_COMMENT : '##' ~[\r\n]* -> channel(HIDDEN) ;
COMMENT : '#' ~[\r\n]* -> skip ;
WS : [ \t\r\n\f\uFEFF]+ -> skip ;
STRAY : . ;
