-- full_subtractor: one-bit full-subtractor cell computing a - b - bin (VHDL twin of
-- ../full_subtractor.v). Textbook equations (common practice, no source):
-- d = a xor b xor bin, bout = (not a and b) or (not (a xor b) and bin).
library ieee;
use ieee.std_logic_1164.all;

entity full_subtractor is
    port (
        a    : in  std_logic;
        b    : in  std_logic;
        bin  : in  std_logic;
        d    : out std_logic;
        bout : out std_logic);
end entity full_subtractor;

architecture dataflow of full_subtractor is
    signal differ : std_logic;
begin
    differ <= a xor b;
    d      <= differ xor bin;
    bout   <= ((not a) and b) or ((not differ) and bin);
end architecture dataflow;
