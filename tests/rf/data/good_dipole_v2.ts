! version 2.1 one-port, values wrapped, information block
[Version] 2.1
# kHz Z RI
[Number of Ports] 1
[Number of Frequencies] 3
[Reference]
  50
[Begin Information]
Antenna: 40 m dipole (invented)
[End Information]
[Network Data]
7000 40.5
  -12.25
7100 49.75 0.5
7200
  61 14
[End]
